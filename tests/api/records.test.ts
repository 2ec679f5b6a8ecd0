import { describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'

const customerBody = (name: string) => ({
  name, kind: 'household',
  contacts: [{ name, email: 'rowan@pondtest.example', phone: '555 0199', getsReports: true, getsInvoices: true, getsAlerts: true }],
  billingLine1: '4 Reed Court', billingCity: 'Larchfield', billingPostcode: '54111', tags: ['Koi', 'koi', 'new'],
})

describe('customers, sites and features: staff edit', () => {
  it('a technician creates a customer, a site and a koi pond whose volume is computed from its sizes', async () => {
    const tech = await tokenFor(demo.tess)
    const c = await api('/api/customers', { method: 'POST', token: tech, body: customerBody('Rowan Testwell') })
    expect(c.status, JSON.stringify(c.body)).toBe(201)
    expect(c.body.tags).toEqual(['koi', 'new'])
    expect(c.body.contacts).toHaveLength(1)

    const s = await api('/api/sites', { method: 'POST', token: tech, body: { customerId: c.body.id, name: 'Home', line1: '4 Reed Court', city: 'Larchfield', latitude: 44.12, longitude: -91.38, gateCode: '4411#', hazards: ['dogs', 'dogs'] } })
    expect(s.status, JSON.stringify(s.body)).toBe(201)
    expect(s.body.gateCode).toBe('4411#')
    expect(s.body.hazards).toEqual(['dogs'])

    // 10 ft × 6 ft × 2 ft → 897.66 US gal (CHECKS.md §3, computed from exact unit definitions).
    const ft = 0.3048
    const f = await api('/api/features', {
      method: 'POST', token: tech,
      body: { siteId: s.body.id, name: 'Back pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 10 * ft, widthM: 6 * ft, depthM: 2 * ft }, equipment: { pumps: [{ name: 'Main', role: 'filter', ratedFlowLph: 3400 }] }, fish: [{ kind: 'koi', count: 5 }] },
    })
    expect(f.status, JSON.stringify(f.body)).toBe(201)
    expect(f.body.computedVolumeL / 3.785411784).toBeCloseTo(897.66, 1)
    expect(f.body.surfaceAreaM2).toBeCloseTo(60 * ft * ft, 6)
    expect(f.body.customerId).toBe(c.body.id)
    expect(f.body.turnoverPerHour).toBeCloseTo(3400 / f.body.computedVolumeL, 6)
    expect(f.body.profile.key).toBe('koi_pond')
    expect(f.body.ranges.pH).toBeTruthy()

    // Editing the shape recomputes the volume: a 10 ft circle 2 ft deep → 1175.0 US gal.
    const e = await api(`/api/features/${f.body.id}`, { method: 'PATCH', token: tech, body: { shape: { kind: 'circle', diameterM: 10 * ft, depthM: 2 * ft } } })
    expect(e.status).toBe(200)
    expect(e.body.computedVolumeL / 3.785411784).toBeCloseTo(1175.0, 0)

    // Search finds the customer by contact e-mail and by tag; the feature list finds the pond.
    const byEmail = await api('/api/customers?q=rowan@pondtest', { token: tech })
    expect(byEmail.body.rows.map((r: { id: string }) => r.id)).toContain(c.body.id)
    const byTag = await api('/api/customers?tag=new', { token: tech })
    expect(byTag.body.rows.map((r: { id: string }) => r.id)).toEqual([c.body.id])
    const features = await api(`/api/features?customerId=${c.body.id}`, { token: tech })
    expect(features.body.rows).toHaveLength(1)

    // Removing: a site with a feature is archived; the customer with a site is archived.
    const delSite = await api(`/api/sites/${s.body.id}`, { method: 'DELETE', token: tech })
    expect(delSite.body.outcome).toBe('archived')
    const delCustomer = await api(`/api/customers/${c.body.id}`, { method: 'DELETE', token: tech })
    expect(delCustomer.body.outcome).toBe('archived')
    const current = await api('/api/customers?q=Rowan Testwell', { token: tech })
    expect(current.body.total).toBe(0)
    const archived = await api('/api/customers?q=Rowan Testwell&status=archived', { token: tech })
    expect(archived.body.total).toBe(1)
    const restored = await api(`/api/customers/${c.body.id}`, { method: 'PATCH', token: tech, body: { archived: false } })
    expect(restored.body.archivedAt).toBeNull()
  })

  it('deletes a customer with no history outright', async () => {
    const owner = await tokenFor(demo.owner)
    const c = await api('/api/customers', { method: 'POST', token: owner, body: customerBody('Brief Customer') })
    const del = await api(`/api/customers/${c.body.id}`, { method: 'DELETE', token: owner })
    expect(del.body.outcome).toBe('deleted')
    expect((await api(`/api/customers/${c.body.id}`, { token: owner })).status).toBe(404)
  })

  it('sorts and pages the customer list on the server', async () => {
    const owner = await tokenFor(demo.owner)
    const asc = await api('/api/customers?sort=name&dir=asc&pageSize=5', { token: owner })
    const names = asc.body.rows.map((r: { name: string }) => r.name)
    expect(names).toEqual([...names].sort((a: string, b: string) => a.localeCompare(b, 'en', { sensitivity: 'base' })))
    const desc = await api('/api/customers?sort=features&dir=desc&pageSize=3', { token: owner })
    const counts = desc.body.rows.map((r: { features: number }) => r.features)
    expect(counts).toEqual([...counts].sort((a: number, b: number) => b - a))
    expect(counts[0]).toBeGreaterThanOrEqual(2)
    expect((await api('/api/customers?sort=password', { token: owner })).status).toBe(400)
  })

  it('only the owner may set a measured volume', async () => {
    const tech = await tokenFor(demo.tess)
    const owner = await tokenFor(demo.owner)
    const list = await api('/api/features?q=Koi pond&pageSize=1', { token: owner })
    const id = list.body.rows[0].id
    expect((await api(`/api/features/${id}`, { method: 'PATCH', token: tech, body: { measuredVolumeL: 12345 } })).status).toBe(403)
    const ok = await api(`/api/features/${id}`, { method: 'PATCH', token: owner, body: { measuredVolumeL: 12345 } })
    expect(ok.body.volumeL).toBe(12345)
    await api(`/api/features/${id}`, { method: 'PATCH', token: owner, body: { measuredVolumeL: null } })
  })

  it('rejects bad input with 400 naming the field, and writes nothing', async () => {
    const owner = await tokenFor(demo.owner)
    const before = (await api('/api/customers?status=all', { token: owner })).body.total
    const r = await api('/api/customers', { method: 'POST', token: owner, body: { name: '', kind: 'castle', contacts: [{ name: 'X', email: 'not-mail' }] } })
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields)).toEqual(expect.arrayContaining(['name', 'kind', 'contacts.0.email']))
    expect((await api('/api/customers?status=all', { token: owner })).body.total).toBe(before)

    const site = (await api('/api/sites?pageSize=1', { token: owner })).body.rows[0]
    const bad = await api('/api/features', { method: 'POST', token: owner, body: { siteId: site.id, name: 'Bad', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: -2, widthM: 2, depthM: 1 } } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields['shape.lengthM']).toMatch(/more than 0/)
    const deepShelf = await api('/api/features', { method: 'POST', token: owner, body: { siteId: site.id, name: 'Bad shelf', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.5, shelf: { lengthM: 4, widthM: 0.3, depthM: 0.8 } } } })
    expect(deepShelf.status).toBe(400)
    expect(Object.keys(deepShelf.body.data.fields)[0]).toMatch(/^shape\.shelf/)
    const halfCoords = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: site.customerId, name: 'X', line1: '1 A St', city: 'Larchfield', latitude: 44 } })
    expect(halfCoords.status).toBe(400)
    expect(halfCoords.body.data.fields.longitude).toBeTruthy()
  })
})

describe('range profiles', () => {
  it('the owner edits a default profile; the feature follows it; a technician may not', async () => {
    const owner = await tokenFor(demo.owner)
    const tech = await tokenFor(demo.tess)
    const profiles = await api('/api/range-profiles', { token: owner })
    const koi = profiles.body.rows.find((p: { key: string }) => p.key === 'koi_pond')
    expect(koi.ranges.pH.source).toBeTruthy()
    const changed = { ...koi.ranges, pH: { ...koi.ranges.pH, watchBelow: 7.2 } }
    expect((await api(`/api/range-profiles/${koi.id}`, { method: 'PATCH', token: tech, body: { ranges: changed } })).status).toBe(403)
    const bad = await api(`/api/range-profiles/${koi.id}`, { method: 'PATCH', token: owner, body: { ranges: { pH: { watchBelow: 6, actBelow: 7 } } } })
    expect(bad.status).toBe(400)
    expect((await api(`/api/range-profiles/${koi.id}`, { method: 'PATCH', token: owner, body: { ranges: changed } })).status).toBe(200)
    const feature = (await api('/api/features?kind=koi_pond&pageSize=1', { token: owner })).body.rows[0]
    const detail = await api(`/api/features/${feature.id}`, { token: owner })
    expect(detail.body.ranges.pH.watchBelow).toBe(7.2)
    await api(`/api/range-profiles/${koi.id}`, { method: 'PATCH', token: owner, body: { ranges: koi.ranges } })
  })
})

describe('removing records with history', () => {
  it('a feature with water tests or a contract is archived, never a 500', async () => {
    const owner = await tokenFor(demo.owner)
    const feature = (await api('/api/features?q=Whitcombe', { token: owner })).body.rows[0]
    const r = await api(`/api/features/${feature.id}`, { method: 'DELETE', token: owner })
    expect(r.status).toBe(200)
    expect(r.body.outcome).toBe('archived')
    expect((await api(`/api/features/${feature.id}`, { method: 'PATCH', token: owner, body: { archived: false } })).body.archivedAt).toBeNull()
  })
})
