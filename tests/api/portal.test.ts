import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { waitForMail } from '../helpers/mail'

let priya: string
let owner: string
let priyaCustomerId: string
let site: { id: string }
let feature: { id: string }
beforeAll(async () => {
  priya = await tokenFor(demo.priya)
  owner = await tokenFor(demo.owner)
  priyaCustomerId = (await api('/api/auth/session', { token: priya })).body.customerId
  const c = (await api(`/api/customers/${priyaCustomerId}`, { token: priya })).body
  site = c.sites[0]
  feature = c.features[0]
})

const today = async () => (await api('/api/today', { token: owner })).body.date as string
const photoForm = async (n = 1) => {
  const form = new FormData()
  form.append('id', randomUUID())
  form.append('file', new Blob([await sharp({ create: { width: 40, height: 30, channels: 3, background: n % 2 ? '#446' : '#664' } }).jpeg().toBuffer()], { type: 'image/jpeg' }), `p${n}.jpg`)
  return form
}

describe('my water features', () => {
  it('each feature has its latest test in plain words, status words, equipment and what is due', async () => {
    const r = await api('/api/portal/features', { token: priya })
    expect(r.status).toBe(200)
    const f = r.body.features.find((x: { id: string }) => x.id === feature.id)
    expect(f.latest).toBeTruthy()
    expect(['ok', 'watch', 'act']).toContain(f.advice.overall)
    expect(f.advice.headline.length).toBeGreaterThan(10)
    expect(f.advice.lines.length).toBeGreaterThan(0)
    expect(f.equipment).toHaveProperty('pumps')
    expect(Array.isArray(f.due)).toBe(true)
  })

  it('the customer\'s own test is saved as customer-entered, evaluated, and shows in the advice', async () => {
    const id = randomUUID()
    const body = { id, featureId: feature.id, takenAt: new Date().toISOString(), pH: 7.4, totalAmmoniaMgL: 2, ammoniaBasis: 'NH3', temperatureC: 22 }
    const r = await api('/api/portal/readings', { method: 'POST', token: priya, body })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.overall).not.toBe('ok')
    expect(r.body.advice.headline).toMatch(/ammonia/i)
    // Sending it again keeps one reading.
    expect((await api('/api/portal/readings', { method: 'POST', token: priya, body })).status).toBe(201)
    const f = (await api('/api/portal/features', { token: priya })).body.features.find((x: { id: string }) => x.id === feature.id)
    expect(f.latest).toMatchObject({ id, source: 'customer' })
    const history = (await api(`/api/features/${feature.id}/readings?pageSize=5&sort=takenAt&dir=desc`, { token: owner })).body
    expect(history.rows.filter((x: { id: string }) => x.id === id)).toHaveLength(1)
    // A later in-range test takes over as the latest (and keeps the demo's other tests meaningful).
    await api('/api/portal/readings', { method: 'POST', token: priya, body: { ...body, id: randomUUID(), takenAt: new Date(Date.now() + 1000).toISOString(), totalAmmoniaMgL: 0.05 } })
  })

  it('refuses a bad own test with a 400 naming the field', async () => {
    const base = { id: randomUUID(), featureId: feature.id, takenAt: new Date().toISOString() }
    for (const [body, field] of [[{ ...base, pH: 15 }, /pH/], [{ ...base }, /pH — Enter at least one result/], [{ ...base, pH: 7, takenAt: new Date(Date.now() + 86_400_000).toISOString() }, /takenAt/], [{ ...base, pH: 7, featureId: randomUUID() }, /featureId/]] as const) {
      const r = await api('/api/portal/readings', { method: 'POST', token: priya, body })
      expect(r.status, JSON.stringify(r.body)).toBe(400)
      expect(r.body.message).toMatch(field)
    }
  })
})

describe('visit reports', () => {
  it('lists finished visits and shows each report with its tests and the e-mail', async () => {
    const list = await api('/api/portal/visits?pageSize=5', { token: priya })
    expect(list.status).toBe(200)
    expect(list.body.total).toBeGreaterThan(0)
    const r = await api(`/api/portal/visits/${list.body.rows[0].id}`, { token: priya })
    expect(r.status).toBe(200)
    expect(r.body).toHaveProperty('readings')
    expect(r.body).toHaveProperty('doses')
    expect(r.body).toHaveProperty('photos')
    // Staff notes never reach the customer.
    expect(JSON.stringify(r.body)).not.toMatch(/internalNotes/)
  })
})

describe('preferences', () => {
  it('the customer picks their units and who gets which e-mails', async () => {
    const before = (await api('/api/portal/preferences', { token: priya })).body
    const contact = before.contacts[0]
    const r = await api('/api/portal/preferences', { method: 'PATCH', token: priya, body: { unitSystem: 'metric', contacts: [{ id: contact.id, getsReports: true, getsInvoices: true, getsAlerts: false }] } })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body.unitSystem).toBe('metric')
    expect((await api('/api/company', { token: priya })).body.unitSystem).toBe('metric')
    // The company's own setting is untouched for everyone else.
    expect((await api('/api/company', { token: owner })).body.unitSystem).toBe('us')
    expect((await api('/api/portal/preferences', { method: 'PATCH', token: priya, body: {} })).status).toBe(400)
    // Back as it was.
    await api('/api/portal/preferences', { method: 'PATCH', token: priya, body: { unitSystem: null, contacts: [{ id: contact.id, getsReports: contact.getsReports, getsInvoices: contact.getsInvoices, getsAlerts: contact.getsAlerts }] } })
    expect((await api('/api/company', { token: priya })).body.unitSystem).toBe('us')
  })
})

describe('service requests', () => {
  it('a customer files one with photos (at most five); the owner books it; the customer sees the visit', async () => {
    const bad = await api('/api/requests', { method: 'POST', token: priya, body: { siteId: site.id, kind: 'leak', description: 'short' } })
    expect(bad.status).toBe(400)
    expect(bad.body.message).toMatch(/description/)
    const past = await api('/api/requests', { method: 'POST', token: priya, body: { siteId: site.id, kind: 'leak', description: 'The level drops two inches a day', preferredDates: ['2020-01-01'] } })
    expect(past.body.message).toMatch(/preferredDates\.0/)
    const day = await today()
    const r = await api('/api/requests', { method: 'POST', token: priya, body: { siteId: site.id, featureId: feature.id, kind: 'leak', description: 'The level drops two inches a day since Sunday', preferredDates: [day] } })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.status).toBe('new')
    for (let i = 1; i <= 5; i++) {
      const up = await fetch(`${baseUrl()}/api/requests/${r.body.id}/photos`, { method: 'POST', headers: { authorization: `Bearer ${priya}` }, body: await photoForm(i) })
      expect(up.status).toBe(201)
    }
    const sixth = await fetch(`${baseUrl()}/api/requests/${r.body.id}/photos`, { method: 'POST', headers: { authorization: `Bearer ${priya}` }, body: await photoForm(6) })
    expect(sixth.status).toBe(400)
    expect((await sixth.json()).message).toMatch(/at most 5 photos/)
    // The owner hears about it and sees it in the inbox with its photos.
    await api('/api/outbox/flush', { method: 'POST', token: owner })
    await waitForMail(m => m.to.includes(demo.owner) && m.subject.startsWith('New request from Priya Whitcombe'))
    const inbox = await api('/api/requests?status=new', { token: owner })
    expect(inbox.body.rows.map((x: { id: string }) => x.id)).toContain(r.body.id)
    expect((await api(`/api/requests/${r.body.id}`, { token: owner })).body.photos).toHaveLength(5)
    // Booking it makes a visit, tells the customer, and shows in their upcoming visits.
    const booked = await api(`/api/requests/${r.body.id}/schedule`, { method: 'POST', token: owner, body: { date: day, startTime: '16:30', durationMinutes: 60, visitType: 'repair', reply: 'We will bring a liner patch kit.' } })
    expect(booked.status, JSON.stringify(booked.body)).toBe(200)
    expect(booked.body).toMatchObject({ status: 'scheduled', visitOn: day })
    expect((await api(`/api/requests/${r.body.id}/schedule`, { method: 'POST', token: owner, body: { date: day, startTime: '16:30', durationMinutes: 60, visitType: 'repair' } })).status).toBe(409)
    const upcoming = (await api('/api/visits?upcoming=true&pageSize=100', { token: priya })).body.rows
    expect(upcoming.map((v: { id: string }) => v.id)).toContain(booked.body.visitId)
    const mine = (await api('/api/requests', { token: priya })).body.rows.find((x: { id: string }) => x.id === r.body.id)
    expect(mine).toMatchObject({ status: 'scheduled', reply: 'We will bring a liner patch kit.' })
    await api('/api/outbox/flush', { method: 'POST', token: owner })
    await waitForMail(m => m.to.includes(demo.priya) && m.subject.startsWith('Visit booked'))
    // No more photos once it is answered.
    expect((await fetch(`${baseUrl()}/api/requests/${r.body.id}/photos`, { method: 'POST', headers: { authorization: `Bearer ${priya}` }, body: await photoForm(7) })).status).toBe(409)
  })

  it('the owner can answer without a visit; staff cannot file requests', async () => {
    const r = await api('/api/requests', { method: 'POST', token: priya, body: { siteId: site.id, kind: 'other', description: 'Can you quote a second waterfall?' } })
    expect((await api(`/api/requests/${r.body.id}/decline`, { method: 'POST', token: owner, body: { reply: '' } })).status).toBe(400)
    const d = await api(`/api/requests/${r.body.id}/decline`, { method: 'POST', token: owner, body: { reply: 'We will call you to talk it through.' } })
    expect(d.body.status).toBe('declined')
    expect((await api('/api/requests', { method: 'POST', token: owner, body: { siteId: site.id, kind: 'other', description: 'Staff cannot do this' } })).status).toBe(403)
  })
})
