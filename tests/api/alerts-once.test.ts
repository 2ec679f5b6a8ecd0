import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'
import { caughtMail, waitForMail } from '../helpers/mail'
import { visitForTessToday } from '../helpers/visits'

// Alerts that inform once: one message per person per feature per scan, words that match the
// severity, and an act-level alert offers the owner a retest visit in one click.

let owner: string
let tess: string
let priya: string
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  tess = await tokenFor(demo.tess)
  priya = await tokenFor(demo.priya)
})

const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000).toISOString()
const scan = async () => (await api('/api/alerts/scan', { method: 'POST', token: owner })).body
const flush = async () => api('/api/outbox/flush', { method: 'POST', token: owner })
interface AlertRow { id: string, condition: string, severity: 'watch' | 'act', status: string, title: string, retestVisitId: string | null }
async function alertsOf(featureId: string) {
  return (await api(`/api/alerts?featureId=${featureId}&status=active&pageSize=100`, { token: owner })).body.rows as AlertRow[]
}
/** Until the outbox has sent everything queued (the scan and the flush run side by side). */
async function settle() {
  for (let i = 0; i < 40; i++) {
    await flush()
    const pending = (await api('/api/outbox?status=pending&pageSize=100', { token: owner })).body
    if (!pending?.rows?.length) return
    await new Promise(r => setTimeout(r, 150))
  }
}

/** A pond whose latest test has three results at the act level: total ammonia, un-ionized ammonia and nitrite. */
async function pondWithThreeActResults(label: string) {
  const v = await visitForTessToday(`once-${label}`)
  await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
  await scan() // whatever came before is not this test's
  // Koi pond defaults (common practice, profiles.ts): TAN act above 1.0 mg/L, NH3 act above 0.05, nitrite act above 0.25.
  // 24 °C, pH 8.0: NH3 fraction 0.0502 (UF/IFAS FA16 from Emerson et al. 1975) → 2.0 × 0.0502 × 1.216 = 0.122 mg/L NH3.
  const reading = { id: randomUUID(), featureId: v.featureId, takenAt: hoursAgo(1), ammoniaBasis: 'N', temperatureC: 24, pH: 8.0, totalAmmoniaMgL: 2.0, nitriteMgL: 0.5 }
  const saved = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [reading] } })
  expect(saved.status, JSON.stringify(saved.body)).toBe(200)
  return v
}

describe('alerts that inform once', () => {
  it('one reading with three out-of-range results sends exactly one e-mail per recipient for the feature, naming all three', async () => {
    const v = await pondWithThreeActResults('three')
    const result = await scan()
    expect(result.readingsScanned).toBe(1)
    const open = await alertsOf(v.featureId)
    const act = open.filter(a => a.severity === 'act' && a.condition.startsWith('reading.'))
    expect(act.map(a => a.condition).sort()).toEqual(['reading.nh3MgL', 'reading.nitriteMgL', 'reading.totalAmmoniaMgL'])
    await settle()
    await waitForMail(m => m.to.includes(v.reportTo) && m.subject.includes('Test koi pond'))
    await new Promise(r => setTimeout(r, 500))
    const toCustomer = caughtMail().filter(m => m.to.includes(v.reportTo))
    expect(toCustomer).toHaveLength(1)
    expect(toCustomer[0]!.subject).toBe('Your Test koi pond needs attention today')
    for (const a of act) expect(toCustomer[0]!.text).toContain(a.title)
    // The owner: one message with the retest link of this feature's alert.
    const toOwner = caughtMail().filter(m => m.to.includes(demo.owner) && act.some(a => m.text.includes(`retest=${a.id}`)))
    expect(toOwner).toHaveLength(1)
    expect(toOwner[0]!.subject).toMatch(/^Act today: Test koi pond — 3 results need action$/)
    // The technician of the site: one message.
    const toTess = caughtMail().filter(m => m.to.includes(demo.tess) && act.every(a => m.text.includes(a.title)))
    expect(toTess).toHaveLength(1)
    // A second scan with nothing new sends nothing more.
    await scan()
    await settle()
    expect(caughtMail().filter(m => m.to.includes(v.reportTo))).toHaveLength(1)
  })

  it('a customer\'s own strip test at the watch level raises a watch alert in watch words, and no "act today" mail', async () => {
    const session = (await api('/api/auth/session', { token: priya })).body
    const feature = (await api(`/api/customers/${session.customerId}`, { token: priya })).body.features[0]
    await scan()
    // Nitrate 30 mg/L: above the koi pond's watch level of 20, below its act level of 50 (common practice, profiles.ts).
    const own = await api('/api/portal/readings', { method: 'POST', token: priya, body: { id: randomUUID(), featureId: feature.id, takenAt: hoursAgo(0.5), pH: 7.5, nitrateMgL: 30 } })
    expect(own.status, JSON.stringify(own.body)).toBe(201)
    expect(own.body.overall).toBe('watch')
    const before = caughtMail().length
    await scan()
    await settle()
    const nitrate = (await alertsOf(feature.id)).find(a => a.condition === 'reading.nitrateMgL')!
    expect(nitrate.severity).toBe('watch')
    expect(nitrate.title).not.toMatch(/act today|attention today|at once/i)
    const after = caughtMail().slice(before)
    expect(after.filter(m => /^Act today/.test(m.subject) && m.text.includes(nitrate.title))).toEqual([])
    expect(after.filter(m => /attention today/.test(m.subject) && m.text.includes(nitrate.title))).toEqual([])
  })

  it('an act alert at a later watch-level reading becomes a watch alert with the watch words', async () => {
    const v = await pondWithThreeActResults('calmer')
    await scan()
    // Later the same day: nitrite down to 0.2 (watch: above 0.1, not above 0.25; common practice, profiles.ts).
    const later = { id: randomUUID(), featureId: v.featureId, takenAt: hoursAgo(0.5), ammoniaBasis: 'N', temperatureC: 24, pH: 7.4, totalAmmoniaMgL: 0.1, nitriteMgL: 0.2 }
    const first = (await api(`/api/visits/${v.visitId}/record`, { token: tess })).body.readings
    await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [...first.map((r: Record<string, unknown>) => ({ id: r.id, featureId: r.featureId, takenAt: r.takenAt, ammoniaBasis: r.ammoniaBasis, temperatureC: r.temperatureC, pH: r.pH, totalAmmoniaMgL: r.totalAmmoniaMgL, nitriteMgL: r.nitriteMgL })), later] } })
    await scan()
    const nitrite = (await alertsOf(v.featureId)).find(a => a.condition === 'reading.nitriteMgL')!
    expect(nitrite.severity).toBe('watch')
    expect(nitrite.title).not.toMatch(/act today/i)
  })
})

describe('a retest visit from an act alert, in one click', () => {
  it('books one visit at the feature\'s site on the next working day; owner only; a second click returns the same visit', async () => {
    const v = await pondWithThreeActResults('retest')
    await scan()
    const alert = (await alertsOf(v.featureId)).find(a => a.severity === 'act')!
    const company = (await api('/api/company', { token: owner })).body as { workingDays: number[] }
    const today = (await api('/api/today', { token: tess })).body.date as string
    const visitsBefore = (await api(`/api/visits?customerId=${v.customerId}&pageSize=100`, { token: owner })).body.rows.length as number

    expect((await api(`/api/alerts/${alert.id}/retest`, { method: 'POST', token: tess })).status).toBe(403)
    expect((await api(`/api/alerts/${alert.id}/retest`, { method: 'POST', token: priya })).status).toBe(403)
    expect((await api('/api/alerts/not-an-id/retest', { method: 'POST', token: owner })).status).toBe(400)
    expect((await api(`/api/alerts/${randomUUID()}/retest`, { method: 'POST', token: owner })).status).toBe(404)

    const booked = await api(`/api/alerts/${alert.id}/retest`, { method: 'POST', token: owner })
    expect(booked.status, JSON.stringify(booked.body)).toBe(201)
    const visit = booked.body.visit as { id: string, scheduledOn: string, visitType: string, siteId: string }
    expect(visit.visitType).toBe('water_test')
    // The next working day after the company's today: later than today, on a working weekday, and no working day skipped.
    expect(visit.scheduledOn > today).toBe(true)
    const weekday = (d: string) => ((new Date(`${d}T12:00:00Z`).getUTCDay() + 6) % 7) + 1
    expect(company.workingDays).toContain(weekday(visit.scheduledOn))
    const closed = new Set(((await api('/api/company/closed-days', { token: owner })).body.rows as Array<{ day: string }>).map(c => c.day))
    for (let d = new Date(`${today}T12:00:00Z`).getTime() + 86_400_000; new Date(d).toISOString().slice(0, 10) < visit.scheduledOn; d += 86_400_000) {
      const day = new Date(d).toISOString().slice(0, 10)
      expect(company.workingDays.includes(weekday(day)) && !closed.has(day), `${day} was a working day`).toBe(false)
    }
    const again = await api(`/api/alerts/${alert.id}/retest`, { method: 'POST', token: owner })
    expect(again.status).toBe(200)
    expect(again.body.visit.id).toBe(visit.id)
    const visitsAfter = (await api(`/api/visits?customerId=${v.customerId}&pageSize=100`, { token: owner })).body.rows as Array<{ id: string, siteId: string }>
    expect(visitsAfter).toHaveLength(visitsBefore + 1)
    expect(visitsAfter.find(x => x.id === visit.id)?.siteId).toBe(visit.siteId)
    expect((await alertsOf(v.featureId)).find(a => a.id === alert.id)?.retestVisitId).toBe(visit.id)
    // The retest's checklist carries the cautions of a visit that may dose chemicals.
    const detail = (await api(`/api/visits/${visit.id}`, { token: owner })).body
    const labels = (detail.checklist ?? detail.visit?.checklist ?? []).map((c: { label: string }) => c.label).join('\n')
    expect(labels).toMatch(/gloves and eye protection/)
    expect(labels).toMatch(/never mix products/)
  })
})
