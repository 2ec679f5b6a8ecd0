import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { MATRIX } from '../helpers/route-matrix'
import { listApiRoutes } from '../helpers/routes'

// Strict tenancy, route by route: the demo customer Priya tries every route a customer may call
// with the ids of another customer (the Ashgrove community garden). Routes come from the file
// system, so a new customer route without an entry below fails this test.

let priya: string
let ash: string
const other: Record<string, string> = {}

/** Which of Ashgrove's ids goes into each kind of `:id`, by the path segment before it. */
const ID_FOR: Record<string, string> = {
  customers: 'customerId', sites: 'siteId', features: 'featureId', contracts: 'contractId', visits: 'visitId',
  photos: 'photoId', invoices: 'invoiceId', requests: 'requestId', feeds: 'feedId',
}
/** Customer routes without an id: what Priya sends, pointing at Ashgrove's records. */
const BODIES: Record<string, () => unknown> = {
  'POST /api/water/evaluate': () => ({ featureId: other.featureId, reading: { pH: 7 } }),
  'POST /api/portal/readings': () => ({ id: randomUUID(), featureId: other.featureId, takenAt: new Date().toISOString(), pH: 7.2 }),
  'POST /api/requests': () => ({ siteId: other.siteId, kind: 'leak', description: 'Someone else\'s pond is leaking badly' }),
  'PATCH /api/portal/preferences': () => ({ contacts: [{ id: other.contactId, getsReports: false, getsInvoices: false, getsAlerts: false }] }),
  // Makes Priya's own feed (harmless): nothing of Ashgrove's can be named in it.
  'POST /api/calendar/feeds': () => ({}),
  'POST /api/auth/logout': () => ({}),
}

async function jpeg() {
  return sharp({ create: { width: 32, height: 24, channels: 3, background: '#3a7d6b' } }).jpeg().toBuffer()
}

beforeAll(async () => {
  priya = await tokenFor(demo.priya)
  ash = await tokenFor(demo.ashgrove)
  const me = (await api('/api/auth/session', { token: ash })).body
  other.customerId = me.customerId
  const customer = (await api(`/api/customers/${me.customerId}`, { token: ash })).body
  other.siteId = customer.sites[0].id
  other.featureId = customer.features[0].id
  other.contactId = customer.contacts[0].id
  other.contractId = (await api('/api/contracts', { token: ash })).body.rows[0].id
  other.visitId = (await api('/api/portal/visits', { token: ash })).body.rows[0].id
  other.invoiceId = (await api('/api/invoices', { token: ash })).body.rows[0].id
  const req = await api('/api/requests', { method: 'POST', token: ash, body: { siteId: other.siteId, kind: 'green_water', description: 'The stream has turned green this week' } })
  expect(req.status, JSON.stringify(req.body)).toBe(201)
  other.requestId = req.body.id
  const form = new FormData()
  form.append('id', randomUUID())
  form.append('file', new Blob([await jpeg()], { type: 'image/jpeg' }), 'stream.jpg')
  const photo = await fetch(`${baseUrl()}/api/requests/${other.requestId}/photos`, { method: 'POST', headers: { authorization: `Bearer ${ash}` }, body: form })
  expect(photo.status).toBe(201)
  other.photoId = (await photo.json()).id
  other.feedId = (await api('/api/calendar/feeds', { method: 'POST', token: ash })).body.id
})

const customerRoutes = listApiRoutes().filter((r) => {
  const who = MATRIX[r.key]
  return Array.isArray(who) && who.includes('customer')
})

describe('tenancy on every customer route', () => {
  it('knows every customer route', () => {
    expect(customerRoutes.length).toBeGreaterThan(20)
    for (const r of customerRoutes) {
      const segs = r.path.split('/')
      const i = segs.findIndex(s => s.startsWith(':'))
      if (i > -1) expect(ID_FOR[segs[i - 1]!], `${r.key}: add its id kind to ID_FOR`).toBeTruthy()
      else if (r.method !== 'GET') expect(BODIES[r.key], `${r.key}: add a body to BODIES`).toBeTruthy()
    }
  })

  for (const r of customerRoutes) {
    it(`${r.key} gives Priya nothing of Ashgrove's`, async () => {
      const segs = r.path.split('/')
      const i = segs.findIndex(s => s.startsWith(':'))
      const mine = Object.values(other)
      if (i > -1) {
        const path = segs.map((s, j) => (j === i ? other[ID_FOR[segs[i - 1]!]!] : s)).join('/')
        const res = await api(path, { method: r.method, token: priya, body: r.method === 'GET' || r.method === 'DELETE' ? undefined : {} })
        expect(res.status, `${r.key} → ${JSON.stringify(res.body).slice(0, 200)}`).toBe(404)
        return
      }
      if (r.method === 'GET') {
        // Lists filtered by Ashgrove's ids hold none of Ashgrove's rows (the company's own settings are shared).
        const q = new URLSearchParams({ customerId: other.customerId!, featureId: other.featureId!, siteId: other.siteId!, contractId: other.contractId! })
        const res = await api(`${r.path}?${q}`, { token: priya })
        expect(res.status, r.key).toBeLessThan(500)
        const text = JSON.stringify(res.body)
        for (const id of mine) expect(text.includes(id), `${r.key} leaks ${id}`).toBe(false)
        return
      }
      if (r.key === 'POST /api/auth/logout') return
      const res = await api(r.path, { method: r.method, token: priya, body: BODIES[r.key]!() })
      expect(res.status, r.key).toBeLessThan(500)
      if (r.key !== 'POST /api/calendar/feeds') expect([400, 403, 404], `${r.key} → ${JSON.stringify(res.body).slice(0, 200)}`).toContain(res.status)
      for (const id of mine) expect(JSON.stringify(res.body).includes(id), `${r.key} leaks ${id}`).toBe(false)
    })
  }

  it('Ashgrove\'s uploads, PDFs and feed stay theirs, and nothing Priya tried changed them', async () => {
    for (const path of [`/api/photos/${other.photoId}?size=thumb`, `/api/invoices/${other.invoiceId}/pdf`]) {
      expect((await fetch(`${baseUrl()}${path}`, { headers: { authorization: `Bearer ${priya}` } })).status).toBe(404)
      expect((await fetch(`${baseUrl()}${path}`, { headers: { authorization: `Bearer ${ash}` } })).status).toBe(200)
    }
    expect((await api('/api/calendar/feeds', { token: ash })).body.feed.id).toBe(other.feedId)
    const prefs = (await api('/api/portal/preferences', { token: ash })).body
    expect(prefs.contacts.find((c: { id: string }) => c.id === other.contactId)).toMatchObject({ getsReports: true })
    const reqs = (await api('/api/requests', { token: ash })).body
    expect(reqs.rows.map((x: { id: string }) => x.id)).toContain(other.requestId)
  })
})
