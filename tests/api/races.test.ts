// Retries and races, each run concurrently: the same photo uploaded twice at once is one photo,
// a dose stays on its own visit, parallel renewals make one renewal. No race answers 500.
import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { visitForTessToday } from '../helpers/visits'

let tess: string
let owner: string
beforeAll(async () => {
  tess = await tokenFor(demo.tess)
  owner = await tokenFor(demo.owner)
})

async function startedVisit(label: string) {
  const v = await visitForTessToday(label)
  const started = await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
  if (started.status !== 200) throw new Error(`could not start the visit: ${JSON.stringify(started.body)}`)
  return v
}

async function uploadPhoto(visitId: string, data: Buffer, id: string) {
  const form = new FormData()
  form.append('id', id)
  form.append('caption', 'Pump intake')
  form.append('file', new Blob([new Uint8Array(data)], { type: 'image/jpeg' }), 'photo.jpg')
  const res = await fetch(`${baseUrl()}/api/visits/${visitId}/photos`, { method: 'POST', body: form, headers: { authorization: `Bearer ${tess}` } })
  return { status: res.status, body: await res.json().catch(() => null) }
}

const dose = (featureId: string, id = randomUUID()) => ({ id, featureId, productName: 'Pond salt', amount: 2, unit: 'kg', dosedAt: new Date().toISOString() })
const record = (doses: unknown[]) => ({ checklist: [], readings: [], doses })

describe('races and retries', () => {
  it('the same photo id uploaded twice at once gives one photo, and both answers are that photo', async () => {
    const v = await startedVisit('race-photo')
    // A photo large enough that the two uploads overlap while it is re-encoded.
    const jpeg = await sharp({ create: { width: 2400, height: 1800, channels: 3, noise: { type: 'gaussian', mean: 128, sigma: 40 } } }).jpeg({ quality: 90 }).toBuffer()
    for (let round = 0; round < 3; round++) {
      const id = randomUUID()
      const answers = await Promise.all([uploadPhoto(v.visitId, jpeg, id), uploadPhoto(v.visitId, jpeg, id), uploadPhoto(v.visitId, jpeg, id)])
      for (const a of answers) {
        expect([200, 201], JSON.stringify(a.body)).toContain(a.status)
        expect(a.body).toEqual(answers[0]!.body)
      }
      expect(answers[0]!.body.id).toBe(id)
      const photos = (await api(`/api/visits/${v.visitId}/record`, { token: tess })).body.photos.filter((p: { id: string }) => p.id === id)
      expect(photos).toHaveLength(1)
      // The row's files are there.
      const full = await fetch(`${baseUrl()}/api/photos/${id}`, { headers: { authorization: `Bearer ${owner}` } })
      expect(full.status).toBe(200)
      expect((await sharp(Buffer.from(await full.arrayBuffer())).metadata()).width).toBe(1600)
      expect((await fetch(`${baseUrl()}/api/photos/${id}?size=thumb`, { headers: { authorization: `Bearer ${owner}` } })).status).toBe(200)
    }
  })

  it('a dose can only be written to its own visit: another visit\'s dose id is a 409 and stays where it was', async () => {
    const a = await startedVisit('dose-a')
    const b = await startedVisit('dose-b')
    const d = dose(a.featureId)
    const savedA = await api(`/api/visits/${a.visitId}/record`, { method: 'PUT', token: tess, body: record([d]) })
    expect(savedA.status, JSON.stringify(savedA.body)).toBe(200)
    // The same id sent for visit B (with B's feature) would move A's dose: refused.
    const moved = await api(`/api/visits/${b.visitId}/record`, { method: 'PUT', token: tess, body: record([{ ...d, featureId: b.featureId, productName: 'Moved' }]) })
    expect(moved.status, JSON.stringify(moved.body)).toBe(409)
    expect(moved.body.message).toMatch(/dose/i)
    const readA = (await api(`/api/visits/${a.visitId}/record`, { token: tess })).body
    expect(readA.doses.map((x: { id: string, productName: string }) => [x.id, x.productName])).toEqual([[d.id, 'Pond salt']])
    expect((await api(`/api/visits/${b.visitId}/record`, { token: tess })).body.doses).toEqual([])
  })

  it('two visits saving the same new dose id at once: one keeps it, the other gets a 409, never a 500', async () => {
    const a = await startedVisit('dose-race-a')
    const b = await startedVisit('dose-race-b')
    for (let round = 0; round < 4; round++) {
      const id = randomUUID()
      const [ra, rb] = await Promise.all([
        api(`/api/visits/${a.visitId}/record`, { method: 'PUT', token: tess, body: record([dose(a.featureId, id)]) }),
        api(`/api/visits/${b.visitId}/record`, { method: 'PUT', token: tess, body: record([dose(b.featureId, id)]) }),
      ])
      expect([ra.status, rb.status].sort(), JSON.stringify([ra.body, rb.body])).toEqual([200, 409])
      const winner = ra.status === 200 ? a : b
      const loser = ra.status === 200 ? b : a
      const inWinner = (await api(`/api/visits/${winner.visitId}/record`, { token: tess })).body.doses.map((x: { id: string }) => x.id)
      const inLoser = (await api(`/api/visits/${loser.visitId}/record`, { token: tess })).body.doses.map((x: { id: string }) => x.id)
      expect(inWinner).toEqual([id])
      expect(inLoser).not.toContain(id)
    }
  })

  it('five renewals of one contract at once: one succeeds, four are 409, one next term exists', async () => {
    const year = new Date().getUTCFullYear() + 1
    const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: 'Renewal Race', kind: 'household' } })
    const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: '9 Test Row', city: 'Larchfield', latitude: 44.15, longitude: -91.34 } })
    const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'water_garden', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.8 } } })
    const plan = await api('/api/plans', { method: 'POST', token: owner, body: { name: `Renewal race ${randomUUID().slice(0, 8)}`, priceMinor: 50_000, currency: 'USD', billingCadence: 'yearly', termMonths: 12, templates: [{ visitType: 'routine', rrule: 'FREQ=MONTHLY;BYDAY=MO;BYSETPOS=1', durationMinutes: 60 }] } })
    const contract = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: `${year}-01-01` } })
    expect(contract.status, JSON.stringify(contract.body)).toBe(201)
    expect((await api(`/api/contracts/${contract.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })).status).toBe(200)
    const answers = await Promise.all(Array.from({ length: 5 }, () => api(`/api/contracts/${contract.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'renew' } })))
    const statuses = answers.map(a => a.status).sort()
    expect(statuses, JSON.stringify(answers.map(a => a.body))).toEqual([200, 409, 409, 409, 409])
    const renewed = answers.find(a => a.status === 200)!.body
    expect(renewed.contract.termStart).toBe(`${year + 1}-01-01`)
    const after = await api(`/api/contracts/${contract.body.id}`, { token: owner })
    expect(after.body.renewedById).toBe(renewed.contract.id)
    const all = (await api(`/api/contracts?customerId=${c.body.id}&pageSize=100`, { token: owner })).body.rows
    expect(all.map((x: { id: string }) => x.id).sort()).toEqual([contract.body.id, renewed.contract.id].sort())
  })
})
