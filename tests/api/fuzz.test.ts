import { randomUUID } from 'node:crypto'
import fc from 'fast-check'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'
import { MATRIX, type Who } from '../helpers/route-matrix'
import { listApiRoutes } from '../helpers/routes'

// Property-based requests against every mutation route (from the file system): random JSON
// bodies, with field names the API uses, sent by a role the route allows. A route must never
// answer 500, and a refused request must leave every table as it was (no partial write).

/** Routes whose empty body is a complete, valid request: there is nothing to fuzz. */
const NO_BODY = new Set([
  'POST /api/auth/logout', 'POST /api/alerts/scan', 'POST /api/outbox/flush', 'POST /api/billing/run', 'POST /api/calendar/feeds',
  'POST /api/dev/mail/test', 'POST /api/invoices/:id/pay', 'POST /api/visits/:id/start', 'DELETE /api/calendar/feeds/:id',
  'DELETE /api/customers/:id', 'DELETE /api/sites/:id', 'DELETE /api/features/:id',
  // A signature over the body decides: covered in invoices.test.ts.
  'POST /api/webhooks/payments',
])
const FIELDS = ['name', 'email', 'password', 'role', 'kind', 'status', 'action', 'reason', 'lines', 'customerId', 'siteId', 'featureId', 'planId', 'contractId',
  'termStart', 'priceMinor', 'currency', 'readings', 'doses', 'checklist', 'description', 'date', 'startTime', 'quantity', 'unitPriceMinor', 'shape', 'equipment',
  'takenAt', 'pH', 'id', 'contacts', 'unitSystem', 'days', 'templates', 'reply', 'method', 'paidOn', 'notes', 'timeZone', 'taxRateBasisPoints']
const body = fc.oneof(
  fc.dictionary(fc.constantFrom(...FIELDS), fc.jsonValue({ maxDepth: 3 }), { maxKeys: 6 }),
  fc.jsonValue({ maxDepth: 3 }),
)

// (alerts and outbox are left out: the scheduled alert scan may write them at any time.)
const TABLES = ['companies', 'users', 'customers', 'customer_contacts', 'sites', 'water_features', 'range_profiles', 'plans', 'plan_visit_templates', 'contracts',
  'contract_features', 'visits', 'readings', 'doses', 'photos', 'products', 'invoices', 'invoice_lines', 'payment_events', 'service_requests', 'closed_days', 'calendar_feeds']

let db: pg.Client
const tokens: Record<Who, string> = { owner: '', technician: '', customer: '' }
beforeAll(async () => {
  db = new pg.Client({ connectionString: inject('databaseUrl') })
  await db.connect()
  tokens.owner = await tokenFor(demo.owner)
  tokens.technician = await tokenFor(demo.tess)
  tokens.customer = await tokenFor(demo.priya)
})
afterAll(async () => { await db?.end() })

async function counts() {
  const { rows } = await db.query(`select ${TABLES.map(t => `(select count(*) from ${t})::int as ${t}`).join(', ')}`)
  return rows[0] as Record<string, number>
}

const routes = listApiRoutes().filter(r => r.method !== 'GET' && !NO_BODY.has(r.key))

describe('fuzzed mutation routes', () => {
  it('finds the mutation routes', () => {
    expect(routes.length).toBeGreaterThan(30)
  })
  for (const route of routes) {
    it(`${route.key}: never a 500, never a partial write`, async () => {
      const who = MATRIX[route.key]
      const token = who === 'public' || !who ? undefined : tokens[who[0]!]
      let accepted = 0
      const before = await counts()
      await fc.assert(fc.asyncProperty(body, async (b) => {
        const path = route.path.replace(/:[^/]+/g, () => randomUUID())
        const r = await api(path, { method: route.method, token, body: b })
        expect(r.status, `${route.key} with ${JSON.stringify(b).slice(0, 300)} → ${JSON.stringify(r.body).slice(0, 300)}`).toBeLessThan(500)
        if (r.status < 300) accepted++
      }), { numRuns: 25, seed: 20261202 })
      if (accepted === 0) expect(await counts(), `${route.key} wrote something while refusing`).toEqual(before)
    })
  }
})
