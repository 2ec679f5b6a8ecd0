import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { listApiRoutes } from '../helpers/routes'

// The only routes that may run without the guard. Everything else calls requireUser() first.
// Public on purpose: signing in, the health check, calendar feeds (a secret token in the URL) and
// the payment provider's webhook (a signature over the body instead of a sign-in).
const PUBLIC = new Set(['POST /api/auth/login', 'GET /api/health', 'GET /api/calendar/:token', 'POST /api/webhooks/payments'])

describe('every API route is guarded', () => {
  const routes = listApiRoutes()
  it('finds the routes', () => {
    expect(routes.length).toBeGreaterThan(5)
  })
  for (const r of routes) {
    it(`${r.key} ${PUBLIC.has(r.key) ? 'is marked public' : 'calls requireUser before reading input'}`, () => {
      const src = readFileSync(resolve(import.meta.dirname, '../..', r.file), 'utf8')
      if (PUBLIC.has(r.key)) {
        expect(src).not.toMatch(/requireUser\(/)
        return
      }
      const guard = src.indexOf('requireUser(')
      expect(guard, 'no requireUser() call').toBeGreaterThan(-1)
      for (const reader of ['readBodyAs(', 'queryAs(', 'paramsAs(', 'readBody(', 'getQuery(']) {
        const at = src.indexOf(reader)
        if (at > -1) expect(at, `${reader} before the guard`).toBeGreaterThan(guard)
      }
    })
  }
})
