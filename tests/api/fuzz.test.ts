import { randomUUID } from 'node:crypto'
import fc from 'fast-check'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { api, demo, tokenFor, type ApiResponse } from '../helpers/api'
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
/**
 * Values PostgreSQL or JavaScript's Date cannot hold, or a column cannot: NUL, lone UTF-16
 * surrogates, year 0 and impossible dates, numbers past integer and bigint ranges.
 */
const HOSTILE = ['\u0000', 'pond\u0000', '\uD800', 'koi \uDC00', '0000-01-01', '2026-02-30', '2026-13-01', '9999-12-31', '0000-01-01T00:00:00Z',
  '2026-02-30T10:00:00Z', '+275760-09-13T00:00:00Z', 2 ** 31, -(2 ** 31) - 1, 2 ** 53, 1e308, -1e308, 100_000_000 * 22, 1e-320, '', ' ', 'x'.repeat(5000)]
const hostile = fc.constantFrom(...HOSTILE)
const leaf = fc.oneof(fc.jsonValue({ maxDepth: 3 }), hostile)
const body = fc.oneof(
  fc.dictionary(fc.constantFrom(...FIELDS), leaf, { maxKeys: 6 }),
  fc.dictionary(fc.constantFrom(...FIELDS), fc.oneof(hostile, fc.array(fc.dictionary(fc.constantFrom(...FIELDS), leaf, { maxKeys: 6 }), { maxLength: 3 })), { maxKeys: 6 }),
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

// A random body is sometimes a valid one: a PUT of closed days or a PATCH of the company then
// changes the demo company itself. Those records are put back afterwards, so later tests (and
// the seed's idempotence check) see the demo as seeded.
const RESTORED = ['companies', 'closed_days']
let saved: Record<string, unknown[]> = {}
beforeAll(async () => {
  // json_agg keeps dates and times as PostgreSQL wrote them (pg would turn a date into a local Date).
  for (const t of RESTORED) saved[t] = (await db.query(`select coalesce(json_agg(t), '[]') as rows from ${t} t`)).rows[0].rows
})
afterAll(async () => {
  if (db && Object.keys(saved).length) {
    await db.query('begin')
    for (const t of RESTORED) {
      const cols = (await db.query(`select * from ${t} limit 0`)).fields.map(f => f.name)
      const list = cols.map(c => `"${c}"`).join(', ')
      const rows = `select ${list} from json_populate_recordset(null::${t}, $1::json)`
      if (t === 'closed_days') {
        await db.query('delete from closed_days')
        await db.query(`insert into closed_days (${list}) ${rows}`, [JSON.stringify(saved[t])])
      } else {
        const set = cols.filter(c => c !== 'id').map(c => `"${c}" = excluded."${c}"`).join(', ')
        await db.query(`insert into ${t} (${list}) ${rows} on conflict (id) do update set ${set}`, [JSON.stringify(saved[t])])
      }
    }
    await db.query('commit')
    saved = {}
  }
  await db?.end()
})

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

// ---- Hostile values on real records ---------------------------------------------------------
// Random ids stop most requests at a 404 before anything reaches the database, so these go to
// the demo company's own records. Every one of them is refused (400) before anything is written.

const ids: Record<string, string> = {}
beforeAll(async () => {
  const owner = tokens.owner
  const first = async (path: string) => (await api(path, { token: owner })).body.rows?.[0]?.id as string | undefined
  for (const [k, path] of Object.entries({
    customers: '/api/customers', sites: '/api/sites', features: '/api/features', products: '/api/products', plans: '/api/plans',
    contracts: '/api/contracts', invoices: '/api/invoices', users: '/api/users', technicians: '/api/technicians', 'range-profiles': '/api/range-profiles',
    visits: '/api/visits?upcoming=true', requests: '/api/requests',
  })) {
    const id = await first(path)
    if (id) ids[k] = id
  }
  const { rows } = await db.query(`insert into alerts (company_id, subject_key, condition, severity, title)
    select company_id, 'fuzz:' || gen_random_uuid(), 'reading', 'watch', 'Fuzz alert' from users where email = $1 returning id`, [demo.owner])
  ids.alerts = rows[0].id
})

/** A real id for a route's `:id`, by the path segment before it. */
function realPath(path: string) {
  return path.replace(/\/([^/]+)\/:[^/]+/g, (_m, seg: string) => `/${seg}/${ids[seg] ?? randomUUID()}`)
}

const patchRoutes = listApiRoutes().filter(r => r.method === 'PATCH')

describe('hostile input never gives a 500', () => {
  it('an empty PATCH body on every PATCH route, with real ids, is a 400', async () => {
    expect(patchRoutes.length).toBeGreaterThan(10)
    for (const r of patchRoutes) {
      const who = MATRIX[r.key]
      const token = Array.isArray(who) ? tokens[who[0]!] : undefined
      const res = await api(realPath(r.path), { method: 'PATCH', token, body: {} })
      expect(res.status, `${r.key} {} → ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`).toBe(400)
    }
  })

  /** Any real calendar day will do: the case is about the impossible one beside it. */
  const DAY = '2027-05-10'
  const line = (quantity: number) => ({ kind: 'labour', description: 'Big job', quantity, unitPriceMinor: 100_000_000 })
  const CASES: Array<{ name: string, who: Who, method?: string, path: () => string, body?: () => unknown, field?: string }> = [
    { name: 'NUL in a list search', who: 'owner', path: () => '/api/customers?q=%00', field: 'q' },
    { name: 'NUL in the invoices search', who: 'owner', path: () => '/api/invoices?q=a%00b', field: 'q' },
    { name: 'NUL in a tag filter', who: 'owner', path: () => '/api/customers?tag=%00', field: 'tag' },
    { name: 'a page past any offset', who: 'owner', path: () => '/api/customers?page=1e20', field: 'page' },
    { name: 'year 0 in the visits filter', who: 'owner', path: () => '/api/visits?from=0000-01-01', field: 'from' },
    { name: 'year 0 for revenue', who: 'owner', path: () => '/api/revenue?asOf=0000-01-01', field: 'asOf' },
    { name: 'year 0 for today', who: 'owner', path: () => '/api/today?date=0000-01-01', field: 'date' },
    { name: 'an impossible day for today', who: 'owner', path: () => '/api/today?date=2026-02-30', field: 'date' },
    { name: 'year 0 on the board', who: 'owner', path: () => '/api/schedule?from=0000-01-01&to=0000-01-02', field: 'from' },
    { name: 'year 0 in the invoices filter', who: 'owner', path: () => '/api/invoices?from=0000-01-01', field: 'from' },
    { name: 'year 0 in a reading filter', who: 'owner', path: () => `/api/features/${ids.features}/readings?from=0000-01-01&to=2026-02-30`, field: 'from' },
    { name: 'an impossible closed day', who: 'owner', method: 'PUT', path: () => '/api/company/closed-days', body: () => ({ days: [{ day: '2026-02-30' }] }), field: 'days.0.day' },
    { name: 'a year-0 closed day', who: 'owner', method: 'PUT', path: () => '/api/company/closed-days', body: () => ({ days: [{ day: '0000-01-01' }] }), field: 'days.0.day' },
    { name: 'a lone surrogate in an alert note', who: 'owner', method: 'PATCH', path: () => `/api/alerts/${ids.alerts}`, body: () => ({ status: 'acknowledged', note: 'fixed \uD800' }), field: 'note' },
    {
      name: 'a lone surrogate in a checklist note', who: 'owner', method: 'PUT', path: () => `/api/visits/${ids.visits}/record`,
      body: () => ({ checklist: [{ label: 'Skimmer', state: 'problem', note: 'torn \uDC00' }], readings: [], doses: [] }), field: 'checklist.0.note',
    },
    { name: 'NUL in a customer name', who: 'owner', method: 'POST', path: () => '/api/customers', body: () => ({ name: 'Koi\u0000', kind: 'household' }), field: 'name' },
    { name: 'NUL in a site gate code', who: 'owner', method: 'PATCH', path: () => `/api/sites/${ids.sites}`, body: () => ({ gateCode: '12\u000034' }), field: 'gateCode' },
    { name: 'a lone surrogate in feature plants', who: 'owner', method: 'PATCH', path: () => `/api/features/${ids.features}`, body: () => ({ plants: 'lilies \uD83D' }), field: 'plants' },
    { name: 'a year-0 install date', who: 'owner', method: 'PATCH', path: () => `/api/features/${ids.features}`, body: () => ({ installedOn: '0000-01-01' }), field: 'installedOn' },
    { name: 'an invoice line past the column', who: 'owner', method: 'POST', path: () => '/api/invoices', body: () => ({ customerId: ids.customers, lines: [line(22)] }), field: 'lines.0.unitPriceMinor' },
    { name: 'invoice lines whose sum is past the column', who: 'owner', method: 'POST', path: () => '/api/invoices', body: () => ({ customerId: ids.customers, lines: Array.from({ length: 22 }, () => line(1)) }), field: 'lines' },
    { name: 'a draft edited past the column', who: 'owner', method: 'PATCH', path: () => `/api/invoices/${ids.invoices}`, body: () => ({ lines: Array.from({ length: 22 }, () => line(1)) }), field: 'lines' },
    { name: 'a year-0 payment date', who: 'owner', method: 'POST', path: () => `/api/invoices/${ids.invoices}/actions`, body: () => ({ action: 'record_payment', method: 'cash', paidOn: '0000-01-01' }), field: 'paidOn' },
    { name: 'a year-0 contract start', who: 'owner', method: 'POST', path: () => '/api/contracts', body: () => ({ customerId: ids.customers, planId: ids.plans, featureIds: [ids.features], termStart: '0000-01-01' }), field: 'termStart' },
    { name: 'a price past the column', who: 'owner', method: 'PATCH', path: () => `/api/plans/${ids.plans}`, body: () => ({ priceMinor: 2 ** 31 }), field: 'priceMinor' },
    { name: 'a capacity past the column', who: 'owner', method: 'PATCH', path: () => `/api/technicians/${ids.technicians}`, body: () => ({ capacityMinutes: 2 ** 31 }), field: 'capacityMinutes' },
    { name: 'an impossible move date', who: 'owner', method: 'PATCH', path: () => `/api/visits/${ids.visits}`, body: () => ({ scheduledOn: '2026-02-30', moveReason: 'x' }), field: 'scheduledOn' },
    { name: 'a year-0 customer test', who: 'customer', method: 'POST', path: () => '/api/portal/readings', body: () => ({ id: randomUUID(), featureId: randomUUID(), takenAt: '0000-01-01T00:00:00Z', pH: 7 }), field: 'takenAt' },
    { name: 'a year-0 preferred date', who: 'customer', method: 'POST', path: () => '/api/requests', body: () => ({ siteId: randomUUID(), kind: 'leak', preferredDates: ['0000-01-01'], description: 'The pond is leaking fast' }), field: 'preferredDates.0' },
    { name: 'a real from-day with an impossible to-day', who: 'owner', path: () => `/api/schedule?from=${DAY}&to=${DAY.slice(0, 8)}32`, field: 'to' },
  ]

  for (const c of CASES) {
    it(`${c.name}: a 400 naming ${c.field}`, async () => {
      const before = await counts()
      const res: ApiResponse = await api(c.path(), { method: c.method ?? 'GET', token: tokens[c.who], body: c.body?.() })
      expect(res.status, `${c.method ?? 'GET'} ${c.path()} → ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`).toBe(400)
      if (c.field) expect(Object.keys(res.body.data?.fields ?? {}), JSON.stringify(res.body)).toContain(c.field)
      expect(res.body.message, 'a message a person can read').toMatch(/[a-z]{3,}/)
      expect(await counts()).toEqual(before)
    })
  }
})
