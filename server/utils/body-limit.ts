import type { IncomingMessage } from 'node:http'
import { Readable } from 'node:stream'
import type { H3Event } from 'h3'
import getRawBody from 'raw-body'
import { httpError } from './errors'

/** The largest photo accepted, before re-encoding. */
export const MAX_PHOTO_BYTES = 15 * 1024 * 1024

/** How a route's body is read: JSON (every API route), raw (signed webhooks), multipart (photo uploads). */
export type BodyKind = 'json' | 'raw' | 'multipart'

/** The most bytes a body of each kind may have, counted as it arrives (Content-Length or not). */
export const BODY_LIMITS: Record<BodyKind, number> = {
  json: 1_000_000,
  raw: 1_000_000,
  // The photo and its form fields (id, feature, caption) with their part headers.
  multipart: MAX_PHOTO_BYTES + 64 * 1024,
}

const PAYLOAD_METHODS = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])
const PHOTO_ROUTE = /^\/api\/(?:visits|requests)\/[^/]+\/photos\/?$/

/** Which limit a request's body gets, decided by its route (never by the headers the client chose). */
export function bodyKindFor(path: string): BodyKind {
  const pathname = path.split('?')[0]!
  if (PHOTO_ROUTE.test(pathname)) return 'multipart'
  if (pathname.startsWith('/api/webhooks/')) return 'raw'
  return 'json'
}

interface Guarded { bodyGuard?: LimitedBody, bodyBytes?: Promise<Buffer | undefined>, tooLarge?: boolean }

const megabytes = (bytes: number) => `${Math.round(bytes / 100_000) / 10} MB`

/** After a 413, what may still arrive (and is thrown away) before the connection is cut. */
const LINGER_BYTES = 64 * 1024 * 1024
const LINGER_MS = 5000

/**
 * Once the 413 has been sent, the rest of the body is read and thrown away for a moment (so the
 * client can read the answer instead of a reset connection), then the connection is cut: an
 * endless upload is never read to its end, and nothing of it is kept.
 */
function drainThenClose(req: IncomingMessage) {
  if (req.complete) return
  let drained = 0
  const cut = () => req.socket?.destroy()
  const timer = setTimeout(cut, LINGER_MS)
  timer.unref()
  req.on('data', (chunk: Buffer) => {
    drained += chunk.length
    if (drained > LINGER_BYTES) {
      clearTimeout(timer)
      cut()
    }
  })
  req.once('end', () => clearTimeout(timer))
  req.once('close', () => clearTimeout(timer))
  req.resume()
}

/** The 413 for a body past its limit; the rest of the body is drained and the connection cut (see drainThenClose). */
export function bodyTooLarge(event: H3Event, limit: number) {
  const ctx = event.context as Guarded
  if (!ctx.tooLarge) {
    ctx.tooLarge = true
    event.node.res.once('finish', () => drainThenClose(event.node.req))
  }
  if (bodyKindFor(event.path) === 'multipart') return httpError(413, 'Invalid body: file — photos may be at most 15 MB', { fields: { file: 'At most 15 MB' } })
  return httpError(413, `Request body too large: at most ${megabytes(limit)}`)
}

export function isTooLarge(err: unknown): boolean {
  const e = err as { statusCode?: number, status?: number } | null
  return e?.statusCode === 413 || e?.status === 413
}

/**
 * The request body as a stream that counts bytes while they arrive and fails with 413 past
 * `limit`. Nothing is read from the socket until someone reads this stream, so a route that
 * refuses the caller first never reads the body at all.
 */
class LimitedBody extends Readable {
  private received = 0
  private attached = false

  constructor(private readonly event: H3Event, private readonly source: IncomingMessage, readonly limit: number) {
    super()
  }

  override _read() {
    if (this.attached) {
      this.source.resume()
      return
    }
    this.attached = true
    this.source.on('data', (chunk: Buffer) => {
      if (this.destroyed) return
      this.received += chunk.length
      if (this.received > this.limit) {
        this.source.pause()
        this.destroy(bodyTooLarge(this.event, this.limit))
        return
      }
      if (!this.push(chunk)) this.source.pause()
    })
    this.source.once('end', () => this.push(null))
    this.source.once('error', err => this.destroy(err))
    this.source.once('close', () => {
      if (!this.source.complete && !this.destroyed) this.destroy(new Error('The request was aborted'))
    })
  }

  override _destroy(err: Error | null, done: (err?: Error | null) => void) {
    this.source.pause()
    done(err)
  }
}



/**
 * Puts the body limit in front of every reader of this request (h3's readBody, readRawBody and
 * readMultipartFormData included): a declared Content-Length past the limit is refused at once,
 * any other body is counted as it is read. Called by server/middleware/body-limit.ts.
 */
export function guardRequestBody(event: H3Event) {
  if (!PAYLOAD_METHODS.has(event.method)) return
  const limit = BODY_LIMITS[bodyKindFor(event.path)]
  const declared = Number(event.node.req.headers['content-length'] ?? 0)
  if (declared > limit) throw bodyTooLarge(event, limit)
  requestBodyStream(event)
}

/** The request body as a limited stream (see LimitedBody); read it once. */
export function requestBodyStream(event: H3Event): Readable {
  const ctx = event.context as Guarded
  if (!ctx.bodyGuard) {
    ctx.bodyGuard = new LimitedBody(event, event.node.req, BODY_LIMITS[bodyKindFor(event.path)])
    // h3's own readers take the body from here instead of the socket.
    ;(event as unknown as { _requestBody?: unknown })._requestBody = ctx.bodyGuard
  }
  return ctx.bodyGuard
}

/**
 * The whole body as bytes, read through the limit (raw-body counts too and checks the declared
 * length); 413 past the limit. Later h3 readers (readBody) parse these bytes.
 */
export function readLimitedBody(event: H3Event): Promise<Buffer | undefined> {
  const ctx = event.context as Guarded
  ctx.bodyBytes ??= readOnce(event)
  return ctx.bodyBytes
}

async function readOnce(event: H3Event): Promise<Buffer | undefined> {
  const req = event.node.req
  const hasBody = Number(req.headers['content-length'] ?? 0) > 0 || /\bchunked\b/i.test(String(req.headers['transfer-encoding'] ?? ''))
  if (!PAYLOAD_METHODS.has(event.method) || !hasBody) return undefined
  const stream = requestBodyStream(event)
  const limit = BODY_LIMITS[bodyKindFor(event.path)]
  const length = req.headers['content-length'] ? Number(req.headers['content-length']) : undefined
  let body: Buffer
  try {
    body = await getRawBody(stream, { limit, length })
  }
  catch (err) {
    if (isTooLarge(err)) throw bodyTooLarge(event, limit)
    throw httpError(400, 'Invalid body: it was cut off before its end')
  }
  ;(event as unknown as { _requestBody?: unknown })._requestBody = body
  return body
}
