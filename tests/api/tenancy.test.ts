import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'

// Two demo customers: each tries every records route with the other's ids.
let priya: string
let ash: string
let owner: string
let ashCustomerId: string
let ashSiteId: string
let ashFeatureId: string
let priyaFeatureId: string

beforeAll(async () => {
  priya = await tokenFor(demo.priya)
  ash = await tokenFor(demo.ashgrove)
  owner = await tokenFor(demo.owner)
  const a = (await api('/api/customers', { token: ash })).body.rows[0]
  ashCustomerId = a.id
  ashSiteId = (await api('/api/sites', { token: ash })).body.rows[0].id
  ashFeatureId = (await api('/api/features', { token: ash })).body.rows[0].id
  priyaFeatureId = (await api('/api/features', { token: priya })).body.rows[0].id
})

describe('tenancy: a customer reaches only their own records', () => {
  it('lists hold only their own rows', async () => {
    const customers = await api('/api/customers?status=all', { token: priya })
    expect(customers.body.rows.map((r: { name: string }) => r.name)).toEqual(['Priya Whitcombe'])
    const sites = await api('/api/sites?status=all&pageSize=100', { token: priya })
    expect(sites.body.rows.every((s: { customerName: string }) => s.customerName === 'Priya Whitcombe')).toBe(true)
    const features = await api('/api/features?status=all&pageSize=100', { token: priya })
    expect(features.body.rows.map((f: { kind: string }) => f.kind)).toEqual(['koi_pond'])
    const filtered = await api(`/api/features?customerId=${ashCustomerId}`, { token: priya })
    expect(filtered.body.rows).toEqual([])
    const ashFeatures = await api('/api/features', { token: ash })
    expect(ashFeatures.body.rows.map((f: { kind: string }) => f.kind).sort()).toEqual(['stream', 'wetland_filter'])
  })

  it('another customer\'s ids are 404 to read and 403 to change', async () => {
    expect((await api(`/api/customers/${ashCustomerId}`, { token: priya })).status).toBe(404)
    expect((await api(`/api/sites/${ashSiteId}`, { token: priya })).status).toBe(404)
    expect((await api(`/api/features/${ashFeatureId}`, { token: priya })).status).toBe(404)
    expect((await api('/api/water/evaluate', { method: 'POST', token: priya, body: { featureId: ashFeatureId, reading: { pH: 7 } } })).status).toBe(404)
    for (const [path, method] of [[`/api/customers/${ashCustomerId}`, 'PATCH'], [`/api/customers/${ashCustomerId}`, 'DELETE'], [`/api/sites/${ashSiteId}`, 'PATCH'], [`/api/sites/${ashSiteId}`, 'DELETE'], [`/api/features/${ashFeatureId}`, 'PATCH'], [`/api/features/${ashFeatureId}`, 'DELETE']] as const) {
      const r = await api(path, { method, token: priya, body: { name: 'Taken over' } })
      expect(r.status, `${method} ${path}`).toBe(403)
    }
    // Nothing changed.
    const still = await api(`/api/customers/${ashCustomerId}`, { token: owner })
    expect(still.body.name).toBe('Ashgrove Community Garden')
  })

  it('customers cannot change even their own records', async () => {
    expect((await api(`/api/features/${priyaFeatureId}`, { method: 'PATCH', token: priya, body: { name: 'Mine now' } })).status).toBe(403)
    expect((await api('/api/customers', { method: 'POST', token: priya, body: { name: 'New', kind: 'household' } })).status).toBe(403)
  })

  it('gate codes never reach a customer', async () => {
    const staffView = await api(`/api/customers/${ashCustomerId}`, { token: owner })
    expect(staffView.body.sites[0]).toHaveProperty('gateCode')
    const own = await api(`/api/customers/${ashCustomerId}`, { token: ash })
    expect(own.status).toBe(200)
    for (const s of own.body.sites) expect(s).not.toHaveProperty('gateCode')
    const sites = await api('/api/sites', { token: ash })
    for (const s of sites.body.rows) expect(s).not.toHaveProperty('gateCode')
    const one = await api(`/api/sites/${ashSiteId}`, { token: ash })
    expect(one.body).not.toHaveProperty('gateCode')
    expect(JSON.stringify(own.body) + JSON.stringify(sites.body)).not.toMatch(/gateCode/)
  })

  it('a customer evaluates a reading for their own feature', async () => {
    const r = await api('/api/water/evaluate', { method: 'POST', token: priya, body: { featureId: priyaFeatureId, reading: { pH: 8.0, temperatureC: 24, totalAmmoniaMgL: 1.0 } } })
    expect(r.status).toBe(200)
    // UF/IFAS FA16 worked example (Emerson et al. 1975): 24 °C, pH 8.0, TAN 1.0 mg/L → 0.0502 mg/L NH3-N.
    expect(r.body.computed.nh3AsNMgL).toBeCloseTo(0.0502, 3)
  })
})
