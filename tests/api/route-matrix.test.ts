import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'
import { MATRIX, type Who } from '../helpers/route-matrix'
import { listApiRoutes } from '../helpers/routes'

const routes = listApiRoutes()
const tokens: Record<Who, string> = { owner: '', technician: '', customer: '' }

beforeAll(async () => {
  tokens.owner = await tokenFor(demo.owner)
  tokens.technician = await tokenFor(demo.tess)
  tokens.customer = await tokenFor(demo.priya)
})

function concretePath(path: string) {
  return path.replace(/:[^/]+/g, () => randomUUID())
}

// Mutations get an empty body: an allowed caller then sees a 400 (validation), never a write.
function call(route: { method: string, path: string }, token?: string) {
  const isMutation = route.method !== 'GET'
  return api(concretePath(route.path), { method: route.method, token, body: isMutation ? {} : undefined })
}

describe('route matrix', () => {
  it('lists every route under server/api', () => {
    const missing = routes.filter(r => !(r.key in MATRIX)).map(r => `${r.key} (${r.file})`)
    expect(missing, 'routes without a matrix entry').toEqual([])
    const stale = Object.keys(MATRIX).filter(k => !routes.some(r => r.key === k))
    expect(stale, 'matrix entries without a route').toEqual([])
  })

  for (const route of routes) {
    const allowed = MATRIX[route.key]
    if (!allowed || allowed === 'public' || route.key === 'POST /api/auth/logout') continue
    it(`${route.key}: 401 for anonymous, 403 for other roles, passes the guard for ${allowed.join('/')}`, async () => {
      const anon = await call(route)
      expect(anon.status).toBe(401)
      expect(anon.body.message).toMatch(/sign in/i)
      for (const who of ['owner', 'technician', 'customer'] as const) {
        const r = await call(route, tokens[who])
        if (allowed.includes(who)) expect([401, 403], `${who} on ${route.key}: ${JSON.stringify(r.body)}`).not.toContain(r.status)
        else expect(r.status, `${who} on ${route.key}`).toBe(403)
        expect(r.status, `${who} on ${route.key} must never 500`).toBeLessThan(500)
      }
    })
  }

  it('a forged or expired-looking token is 401, as JSON', async () => {
    const r = await api('/api/auth/session', { token: 'forged-token-value' })
    expect(r.status).toBe(401)
    expect(r.headers.get('content-type')).toMatch(/json/)
  })
})
