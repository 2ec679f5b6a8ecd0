import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'
import { listApiRoutes } from '../helpers/routes'

type Who = 'owner' | 'technician' | 'customer'
/**
 * Who may call each route. `public` routes need no session; every other route answers 401 to an
 * anonymous caller and 403 to a role not listed. A new route without an entry fails this test.
 */
const MATRIX: Record<string, Who[] | 'public'> = {
  'POST /api/auth/login': 'public',
  'GET /api/health': 'public',
  // The unguessable token in the address is the credential (calendar apps cannot sign in).
  'GET /api/calendar/:token': 'public',
  'GET /api/auth/session': ['owner', 'technician', 'customer'],
  'POST /api/auth/logout': ['owner', 'technician', 'customer'],
  'GET /api/company': ['owner', 'technician', 'customer'],
  'PATCH /api/company': ['owner'],
  'GET /api/company/closed-days': ['owner', 'technician'],
  'PUT /api/company/closed-days': ['owner'],
  'GET /api/overview': ['owner'],
  'GET /api/audit': ['owner'],
  'GET /api/outbox': ['owner'],
  'POST /api/outbox/flush': ['owner'],
  'GET /api/dev/mail': ['owner'],
  'GET /api/dev/mail/:id': ['owner'],
  'POST /api/dev/mail/test': ['owner'],
  'GET /api/users': ['owner'],
  'POST /api/users': ['owner'],
  'PATCH /api/users/:id': ['owner'],
  'GET /api/today': ['owner', 'technician'],
  'PUT /api/today/order': ['owner', 'technician'],
  'GET /api/plans': ['owner', 'technician'],
  'POST /api/plans': ['owner'],
  'GET /api/plans/:id': ['owner', 'technician'],
  'PATCH /api/plans/:id': ['owner'],
  // Customers read only their own contracts and visits: checked in schedule tests.
  'GET /api/contracts': ['owner', 'technician', 'customer'],
  'POST /api/contracts': ['owner'],
  'GET /api/contracts/:id': ['owner', 'technician', 'customer'],
  'PATCH /api/contracts/:id': ['owner'],
  'POST /api/contracts/:id/actions': ['owner'],
  'GET /api/schedule': ['owner', 'technician'],
  'GET /api/technicians': ['owner', 'technician'],
  'PATCH /api/technicians/:id': ['owner'],
  'GET /api/visits': ['owner', 'technician', 'customer'],
  'GET /api/visits/:id': ['owner', 'technician', 'customer'],
  'PATCH /api/visits/:id': ['owner'],
  // Running a visit: the owner or its technician (another technician gets 403: visits.test.ts).
  'GET /api/visits/:id/record': ['owner', 'technician'],
  'PUT /api/visits/:id/record': ['owner', 'technician'],
  'POST /api/visits/:id/start': ['owner', 'technician'],
  'POST /api/visits/:id/finish': ['owner', 'technician'],
  'POST /api/visits/:id/skip': ['owner', 'technician'],
  'POST /api/visits/:id/photos': ['owner', 'technician'],
  'GET /api/photos/:id': ['owner', 'technician', 'customer'],
  'GET /api/products': ['owner', 'technician'],
  'POST /api/products': ['owner'],
  'PATCH /api/products/:id': ['owner'],
  'GET /api/features/:id/readings': ['owner', 'technician', 'customer'],
  'GET /api/features/:id/visits': ['owner', 'technician', 'customer'],
  'GET /api/features/:id/series': ['owner', 'technician', 'customer'],
  'GET /api/alerts': ['owner', 'technician'],
  'GET /api/alerts/counts': ['owner', 'technician'],
  'PATCH /api/alerts/:id': ['owner', 'technician'],
  'POST /api/alerts/scan': ['owner'],
  'GET /api/calendar/feeds': ['owner', 'technician', 'customer'],
  'POST /api/calendar/feeds': ['owner', 'technician', 'customer'],
  'DELETE /api/calendar/feeds/:id': ['owner', 'technician', 'customer'],
  // Customers read only their own records: that is checked in tenancy.test.ts.
  'GET /api/customers': ['owner', 'technician', 'customer'],
  'POST /api/customers': ['owner', 'technician'],
  'GET /api/customers/:id': ['owner', 'technician', 'customer'],
  'PATCH /api/customers/:id': ['owner', 'technician'],
  'DELETE /api/customers/:id': ['owner', 'technician'],
  'GET /api/sites': ['owner', 'technician', 'customer'],
  'POST /api/sites': ['owner', 'technician'],
  'GET /api/sites/:id': ['owner', 'technician', 'customer'],
  'PATCH /api/sites/:id': ['owner', 'technician'],
  'DELETE /api/sites/:id': ['owner', 'technician'],
  'GET /api/features': ['owner', 'technician', 'customer'],
  'POST /api/features': ['owner', 'technician'],
  'GET /api/features/:id': ['owner', 'technician', 'customer'],
  'PATCH /api/features/:id': ['owner', 'technician'],
  'DELETE /api/features/:id': ['owner', 'technician'],
  'GET /api/range-profiles': ['owner', 'technician'],
  'PATCH /api/range-profiles/:id': ['owner'],
  'POST /api/water/evaluate': ['owner', 'technician', 'customer'],
  // Customers read and pay only their own invoices (never drafts): checked in billing.test.ts.
  'GET /api/invoices': ['owner', 'customer'],
  'POST /api/invoices': ['owner'],
  'GET /api/exports/invoices.csv': ['owner'],
  'GET /api/invoices/:id': ['owner', 'customer'],
  'PATCH /api/invoices/:id': ['owner'],
  'POST /api/invoices/:id/actions': ['owner'],
  'GET /api/invoices/:id/pdf': ['owner', 'customer'],
  'POST /api/invoices/:id/pay': ['customer'],
  // The payment provider signs its events instead of signing in (bad signatures: billing.test.ts).
  'POST /api/webhooks/payments': 'public',
  // Runs the billing job for the owner's company (it writes only what is due, once).
  'POST /api/billing/run': ['owner'],
  'GET /api/billing/runs': ['owner'],
  'GET /api/revenue': ['owner'],
  // The customer portal: a customer's own records only (tenancy-routes.test.ts tries another's ids).
  'GET /api/portal/features': ['customer'],
  'GET /api/portal/treatments': ['customer'],
  'POST /api/portal/readings': ['customer'],
  'GET /api/portal/visits': ['customer'],
  'GET /api/portal/visits/:id': ['customer'],
  'GET /api/portal/preferences': ['customer'],
  'PATCH /api/portal/preferences': ['customer'],
  'GET /api/requests': ['owner', 'customer'],
  'POST /api/requests': ['customer'],
  'GET /api/requests/:id': ['owner', 'customer'],
  'POST /api/requests/:id/photos': ['customer'],
  'POST /api/requests/:id/schedule': ['owner'],
  'POST /api/requests/:id/decline': ['owner'],
}

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
