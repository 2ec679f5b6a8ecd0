import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'
import { waitForMail } from '../helpers/mail'
import { visitForTessToday } from '../helpers/visits'

let tess: string
let owner: string
beforeAll(async () => {
  tess = await tokenFor(demo.tess)
  owner = await tokenFor(demo.owner)
})

const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000).toISOString()
const scan = async () => (await api('/api/alerts/scan', { method: 'POST', token: owner })).body
async function alertsOf(featureId: string, status = 'active') {
  return (await api(`/api/alerts?featureId=${featureId}&status=${status}&pageSize=100`, { token: owner })).body.rows as Array<{ id: string, condition: string, severity: string, status: string, title: string }>
}
/** A started visit on a fresh koi pond; `record(readings)` saves readings with the times given. */
async function pond(label: string) {
  const v = await visitForTessToday(`alerts-${label}`)
  await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
  const all: Array<Record<string, unknown>> = []
  return {
    ...v,
    async record(...rs: Array<Record<string, unknown>>) {
      all.push(...rs.map(r => ({ id: randomUUID(), featureId: v.featureId, ammoniaBasis: 'N', ...r })))
      const res = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], readings: all, doses: [] } })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
    },
  }
}

describe('the alert scan', () => {
  it('raises an out-of-range reading once, notifies for act, and closes it when a later reading is back in range', async () => {
    await scan()
    const p = await pond('range')
    await p.record({ takenAt: hoursAgo(2), temperatureC: 24, pH: 8.0, totalAmmoniaMgL: 2.0 })
    const first = await scan()
    expect(first.skipped).toBe(false)
    expect(first.readingsScanned).toBe(1)
    const open = await alertsOf(p.featureId)
    const nh3 = open.find(a => a.condition === 'reading.nh3MgL')!
    expect(nh3.severity).toBe('act')
    expect(open.find(a => a.condition === 'reading.totalAmmoniaMgL')).toBeTruthy()
    // A second run with nothing new: same alerts, none new (the watermark moved on).
    const second = await scan()
    expect(second.readingsScanned).toBe(0)
    expect((await alertsOf(p.featureId)).map(a => a.id).sort()).toEqual(open.map(a => a.id).sort())
    // The customer's alert contact and the owner hear about it.
    const mail = await waitForMail(m => m.to.includes('mara@heronmere.example') && m.subject.startsWith('Act today'))
    expect(mail.text).toMatch(/ammonia/i)
    await waitForMail(m => m.to.includes(p.reportTo) && /needs attention/.test(m.subject))
    // Back in range later: closed by itself.
    await p.record({ takenAt: hoursAgo(1), temperatureC: 24, pH: 7.4, totalAmmoniaMgL: 0.05 })
    await scan()
    expect((await alertsOf(p.featureId)).filter(a => a.condition.startsWith('reading.'))).toEqual([])
    expect((await alertsOf(p.featureId, 'resolved')).map(a => a.condition)).toContain('reading.nh3MgL')
  })

  it('sees trends: a pH drop, KH low and falling, a temperature swing', async () => {
    const p = await pond('trends')
    await p.record({ takenAt: hoursAgo(30), temperatureC: 12, pH: 8.2, khMgL: 90 })
    await scan()
    await p.record({ takenAt: hoursAgo(1), temperatureC: 19, pH: 7.0, khMgL: 60 })
    await scan()
    const conditions = (await alertsOf(p.featureId)).map(a => a.condition)
    expect(conditions).toEqual(expect.arrayContaining(['trend.ph_drop', 'trend.kh_falling', 'trend.temperature_swing']))
    const drop = (await alertsOf(p.featureId)).find(a => a.condition === 'trend.ph_drop')!
    // 8.2 → 7.0 is a fall of 1.2: above the act threshold (EU Directive 2006/44/EC allows ±0.5).
    expect(drop.severity).toBe('act')
  })

  it('flags water loss beyond evaporation from level readings', async () => {
    const p = await pond('leak')
    await p.record({ takenAt: hoursAgo(48), pH: 7.5, waterLevelMm: 0 })
    await p.record({ takenAt: hoursAgo(0.5), pH: 7.5, waterLevelMm: -40 })
    await scan()
    const loss = (await alertsOf(p.featureId)).find(a => a.condition === 'water_loss')
    // 40 mm in two days = 20 mm a day, over twice the ~3.6 mm/day allowance (common practice).
    expect(loss?.severity).toBe('act')
  })

  it('flags an overdue visit, a UV bulb due and a contract ending without renewal; acknowledging and resolving work', async () => {
    const v = await visitForTessToday('alerts-due')
    // Dates in the company's time zone (Today's date), not the test machine's.
    const companyToday = (await api('/api/today', { token: tess })).body.date as string
    const yesterday = new Date(Date.parse(`${companyToday}T12:00:00Z`) - 86_400_000).toISOString().slice(0, 10)
    await api(`/api/visits/${v.visitId}`, { method: 'PATCH', token: owner, body: { scheduledOn: yesterday, moveReason: 'Test overdue' } })
    await api(`/api/features/${v.featureId}`, { method: 'PATCH', token: owner, body: { equipment: { uvClarifier: { watts: 18, bulbInstalledOn: '2020-04-01' } } } })
    const plan = (await api('/api/plans?pageSize=1', { token: owner })).body.rows[0]
    const start = new Date(Date.now() - 330 * 86_400_000).toISOString().slice(0, 10)
    const c = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: v.customerId, planId: plan.id, featureIds: [v.featureId], termStart: start, autoRenew: false } })
    await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
    await scan()
    const all = (await api('/api/alerts?status=active&pageSize=100', { token: owner })).body.rows as Array<{ id: string, condition: string, featureId: string | null, title: string }>
    expect(all.some(a => a.condition === 'visit.overdue' && a.title.includes(v.customerName))).toBe(true)
    expect(all.some(a => a.condition === 'equipment.uv_bulb' && a.featureId === v.featureId)).toBe(true)
    const renewal = all.find(a => a.condition === 'contract.renewal' && a.title.includes(v.customerName))!
    expect(renewal).toBeTruthy()
    expect((await api(`/api/alerts/${renewal.id}`, { method: 'PATCH', token: tess, body: { status: 'resolved' } })).status).toBe(400)
    expect((await api(`/api/alerts/${renewal.id}`, { method: 'PATCH', token: tess, body: { status: 'acknowledged' } })).body.status).toBe('acknowledged')
    expect((await api(`/api/alerts/${renewal.id}`, { method: 'PATCH', token: owner, body: { status: 'resolved', note: 'Customer renews by phone' } })).body.status).toBe('resolved')
    // The overdue alert closes once the visit is no longer overdue.
    const today = companyToday
    await api(`/api/visits/${v.visitId}`, { method: 'PATCH', token: owner, body: { scheduledOn: today, moveReason: 'Back to today' } })
    await scan()
    const after = (await api('/api/alerts?status=active&pageSize=100', { token: owner })).body.rows as Array<{ condition: string, title: string }>
    expect(after.some(a => a.condition === 'visit.overdue' && a.title.includes(v.customerName))).toBe(false)
  })

  it('runs once across two instances started at the same moment', async () => {
    const p = await pond('twice')
    await p.record({ takenAt: hoursAgo(1), temperatureC: 20, pH: 9.8 })
    const [a, b] = await Promise.all([scan(), scan()])
    expect([a.skipped, b.skipped].filter(Boolean).length).toBeLessThanOrEqual(1)
    expect((a.readingsScanned ?? 0) + (b.readingsScanned ?? 0)).toBe(1)
    const ph = (await alertsOf(p.featureId)).filter(x => x.condition === 'reading.pH')
    expect(ph).toHaveLength(1)
  })

  it('customers cannot see or run alerts', async () => {
    const priya = await tokenFor(demo.priya)
    expect((await api('/api/alerts', { token: priya })).status).toBe(403)
    expect((await api('/api/alerts/scan', { method: 'POST', token: priya })).status).toBe(403)
  })
})
