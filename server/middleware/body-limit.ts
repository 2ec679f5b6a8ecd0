// Body size limits that hold whether or not the client sends Content-Length: before any route or
// middleware reads a body, its stream is replaced by one that counts bytes and fails with 413 at
// the route's limit (JSON, the signed webhook, photo uploads; see server/utils/body-limit.ts).
// nuxt-security's limiter only reads the Content-Length header.
export default defineEventHandler((event) => {
  guardRequestBody(event)
})
