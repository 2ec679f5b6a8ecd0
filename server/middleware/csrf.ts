// Cross-site request forgery: a change made with the session cookie must come from this site.
// Browsers send Origin (and Sec-Fetch-Site) with every POST/PUT/PATCH/DELETE; a request from
// another site is refused. Calls that carry their own credential (an Authorization header) or
// a signature (the payment webhook) are not driven by the cookie and pass (the guard never reads
// the cookie when an Authorization header is present). OWASP's "verifying origin with standard
// headers"; the session cookie is also SameSite=Lax.
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  if (SAFE.has(event.method) || !event.path.startsWith('/api/')) return
  if (event.path.startsWith('/api/webhooks/')) return
  if (getRequestHeader(event, 'authorization')) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  if (site && site !== 'same-origin' && site !== 'none') throw httpError(403, 'Refused: this change did not come from this site')
  const origin = getRequestHeader(event, 'origin')
  if (origin && origin !== 'null') {
    let host: string
    try {
      host = new URL(origin).host
    }
    catch {
      throw httpError(403, 'Refused: unreadable Origin header')
    }
    const trustProxy = process.env.RILLBOOK_TRUST_PROXY === '1'
    if (host !== getRequestHost(event, { xForwardedHost: trustProxy })) throw httpError(403, 'Refused: this change did not come from this site')
  }
  else if (origin === 'null') throw httpError(403, 'Refused: this change did not come from this site')
})
