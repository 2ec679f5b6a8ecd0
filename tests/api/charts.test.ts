import { randomUUID } from 'node:crypto'
import { and, eq } from 'drizzle-orm'
import { DateTime } from 'luxon'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { equipmentSchema } from '../../shared/schemas/features'
import { api, demo, tokenFor } from '../helpers/api'
import { buildBook, closeTestDb, testDb } from '../helpers/billing-book'
import { startInstance, stopInstance, type Instance } from '../helpers/instances'

interface Series { key: string, label: string, unit: string, points: Array<[string, number]> }
interface Body { featureId: string, range: string, from: string | null, to: string, parameters: Series[], ranges: Record<string, unknown>, visits: Array<{ date: string, type: string, time: string }>, doses: unknown[] }

let owner: string
let priya: string
let koiId: string
let ashgroveId: string
let timeZone: string

beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  priya = await tokenFor(demo.priya)
  const whitcombe = await api('/api/features?q=Whitcombe', { token: owner })
  koiId = whitcombe.body.rows.find((f: { kind: string }) => f.kind === 'koi_pond').id
  const ash = await api('/api/features?q=Ashgrove', { token: owner })
  ashgroveId = ash.body.rows[0].id
  timeZone = (await api('/api/company', { token: owner })).body.timeZone
})

function expectInOrderWithin(body: Body) {
  const from = body.from ? Date.parse(body.from) : -Infinity
  const to = Date.parse(body.to)
  for (const p of body.parameters) {
    const times = p.points.map(([t]) => Date.parse(t))
    expect(times.every(Number.isFinite), p.key).toBe(true)
    expect(times, `${p.key} in time order`).toEqual([...times].sort((a, b) => a - b))
    expect(times.every(t => t >= from && t <= to), `${p.key} within the range`).toBe(true)
    expect(p.points.every(([, v]) => typeof v === 'number' && Number.isFinite(v))).toBe(true)
    expect(p.points.length).toBeLessThanOrEqual(5000)
  }
}

describe('GET /api/features/:id/series', () => {
  it('answers the feature\'s readings as time series within the last year by default, with its ranges and visits', async () => {
    const r = await api<Body>(`/api/features/${koiId}/series`, { token: owner })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    const b = r.body
    expect(b.featureId).toBe(koiId)
    expect(b.range).toBe('year')
    // From the start of the company's day 365 days ago (whole days: the answer holds all day).
    const today = DateTime.fromISO(b.to, { zone: timeZone }).toISODate()!
    expect(Date.parse(b.from!)).toBe(DateTime.fromISO(today, { zone: timeZone }).minus({ days: 365 }).toMillis())
    const keys = b.parameters.map(p => p.key)
    for (const k of ['temperatureC', 'pH', 'totalAmmoniaMgL', 'nh3MgL', 'khMgL', 'dissolvedOxygenMgL', 'doSaturationPct']) expect(keys).toContain(k)
    // Only measured parameters, each with its SI unit and at least one point.
    expect(b.parameters.every(p => p.points.length > 0)).toBe(true)
    expect(b.parameters.find(p => p.key === 'temperatureC')!.unit).toBe('°C')
    expect(b.parameters.find(p => p.key === 'khMgL')!.unit).toBe('mg/L')
    expectInOrderWithin(b)
    const feature = await api(`/api/features/${koiId}`, { token: owner })
    expect(b.ranges).toEqual(feature.body.ranges)
    expect(b.visits.length).toBeGreaterThan(0)
    for (const v of b.visits) {
      expect(v.date).toMatch(/^\d{4}-\d{2}-\d{2}$/)
      expect(v.type).toBeTruthy()
      expect(Date.parse(v.time)).toBeGreaterThanOrEqual(Date.parse(b.from!) - 86_400_000)
    }
    expect(Array.isArray(b.doses)).toBe(true)
  })

  it('respects the range: the season starts on 1 March in the company\'s time zone, all goes back further', async () => {
    const season = (await api<Body>(`/api/features/${koiId}/series?range=season`, { token: owner })).body
    const local = DateTime.fromISO(season.to, { zone: timeZone })
    const start = DateTime.fromObject({ year: local.month >= 3 ? local.year : local.year - 1, month: 3, day: 1 }, { zone: timeZone })
    expect(season.range).toBe('season')
    expect(Date.parse(season.from!)).toBe(start.toMillis())
    expectInOrderWithin(season)
    expect(season.visits.every(v => v.date >= start.toISODate()!)).toBe(true)

    const year = (await api<Body>(`/api/features/${koiId}/series?range=year`, { token: owner })).body
    const all = (await api<Body>(`/api/features/${koiId}/series?range=all`, { token: owner })).body
    expect(all.from).toBeNull()
    expectInOrderWithin(all)
    const count = (b: Body, k: string) => b.parameters.find(p => p.key === k)?.points.length ?? 0
    // Two seasons of demo readings: everything holds more than the last 365 days.
    expect(count(all, 'pH')).toBeGreaterThan(count(year, 'pH'))
    expect(Date.parse(all.parameters.find(p => p.key === 'pH')!.points[0]![0])).toBeLessThan(Date.parse(year.from!))
    expect(count(year, 'pH')).toBeGreaterThanOrEqual(count(season, 'pH'))
  })

  it('answers only the parameters asked for, even when one has no points', async () => {
    const r = await api<Body>(`/api/features/${koiId}/series?range=season&parameters=pH,khMgL,chlorineMgL`, { token: owner })
    expect(r.status).toBe(200)
    expect(r.body.parameters.map(p => p.key)).toEqual(['pH', 'khMgL', 'chlorineMgL'])
    expect(r.body.parameters[2]!.points).toEqual([])
    expectInOrderWithin(r.body)
  })

  it('is a 400 naming the field for a bad range or parameter', async () => {
    const bad = await api(`/api/features/${koiId}/series?range=decade`, { token: owner })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields).toHaveProperty('range')
    const param = await api(`/api/features/${koiId}/series?parameters=pH,colour`, { token: owner })
    expect(param.status).toBe(400)
    expect(Object.keys(param.body.data.fields).join()).toMatch(/parameters/)
    expect((await api('/api/features/not-an-id/series', { token: owner })).status).toBe(400)
  })

  it('a customer sees their own feature and gets a 404 for another customer\'s', async () => {
    const own = await api<Body>(`/api/features/${koiId}/series?range=all&parameters=temperatureC,pH,totalAmmoniaMgL,nh3MgL,khMgL`, { token: priya })
    expect(own.status).toBe(200)
    expect(own.body.parameters.map(p => p.key)).toEqual(['temperatureC', 'pH', 'totalAmmoniaMgL', 'nh3MgL', 'khMgL'])
    expect(own.body.parameters[1]!.points.length).toBeGreaterThan(0)
    const other = await api(`/api/features/${ashgroveId}/series`, { token: priya })
    expect(other.status).toBe(404)
    expect(JSON.stringify(other.body)).not.toMatch(/points/)
  })
})

// The built series are kept per process until a change counter of the feature or its company
// moves (server/utils/versioned-cache.ts). After every kind of change that feeds a series, the
// test server and a second caching instance, both holding the previous step's answers, must
// answer what an instance that keeps nothing (RILLBOOK_ANSWER_CACHE=0) computes afresh.
describe('the series kept between changes', () => {
  let cached: Instance
  let fresh: Instance
  let owner: string
  let companyId: string
  let featureId: string
  let siteId: string
  let customerId: string
  beforeAll(async () => {
    ;[cached, fresh] = await Promise.all([startInstance('series-b', 1), startInstance('series-fresh', 2, undefined, { RILLBOOK_ANSWER_CACHE: '0' })])
    const book = await buildBook('series')
    companyId = book.companyId
    owner = await tokenFor(book.ownerEmail)
    const [f] = await testDb().select().from(schema.waterFeatures).where(eq(schema.waterFeatures.companyId, companyId))
    featureId = f!.id
    siteId = f!.siteId
    // The billing book writes the feature without equipment; give it what the features API would.
    await testDb().update(schema.waterFeatures).set({ equipment: equipmentSchema.parse({}) }).where(eq(schema.waterFeatures.id, featureId))
    customerId = f!.customerId
  }, 120_000)
  afterAll(async () => {
    await Promise.all([stopInstance(cached), stopInstance(fresh)])
    await closeTestDb()
  })

  const QUERIES = ['range=year', 'range=season', 'range=all', 'range=year&parameters=pH,khMgL']
  const withoutTime = ({ to: _to, ...rest }: Body) => rest
  async function expectFresh(step: string) {
    for (const q of QUERIES) {
      const path = `/api/features/${featureId}/series?${q}`
      const want = await api<Body>(path, { token: owner, base: fresh.baseUrl })
      expect(want.status, step).toBe(200)
      for (const [where, base] of [['the test server', undefined], ['the second instance', cached.baseUrl]] as const) {
        const got = await api<Body>(path, { token: owner, base })
        expect(got.status, step).toBe(200)
        expect(withoutTime(got.body), `${step}: ${q} on ${where}`).toEqual(withoutTime(want.body))
      }
    }
  }
  const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000)
  const reading = (takenAt: Date, pH: number) => ({ id: randomUUID(), companyId, featureId, takenAt, temperatureC: 18, pH, khMgL: 90, overall: 'ok' as const })

  it('equals a fresh computation after every kind of change', async () => {
    await testDb().insert(schema.readings).values([reading(daysAgo(3), 7.6), reading(daysAgo(40), 7.9)])
    await expectFresh('two readings')
    await expectFresh('nothing changed')

    await testDb().insert(schema.readings).values(reading(daysAgo(1), 6.9))
    await expectFresh('a new reading')
    const [last] = await testDb().select({ id: schema.readings.id }).from(schema.readings).where(and(eq(schema.readings.featureId, featureId), eq(schema.readings.pH, 6.9)))
    await testDb().update(schema.readings).set({ pH: 7.1 }).where(eq(schema.readings.id, last!.id))
    await expectFresh('a reading corrected')

    const onDay = DateTime.fromJSDate(daysAgo(2), { zone: 'America/Chicago' }).toISODate()!
    const [visit] = await testDb().insert(schema.visits).values({ companyId, customerId, siteId, visitType: 'routine', scheduledOn: onDay, startsAt: daysAgo(2), durationMinutes: 60, status: 'scheduled' }).returning()
    await expectFresh('a visit planned')
    await testDb().update(schema.visits).set({ status: 'done', startedAt: daysAgo(2), finishedAt: daysAgo(2) }).where(eq(schema.visits.id, visit!.id))
    await expectFresh('a visit done')

    await testDb().insert(schema.doses).values({ id: randomUUID(), companyId, featureId, visitId: visit!.id, productName: 'Sodium bicarbonate', amount: 450, unit: 'g', dosedAt: daysAgo(2) })
    await expectFresh('a dose')

    // The feature's own ranges, then the company's profile for its kind.
    const edit = await api(`/api/features/${featureId}`, { method: 'PATCH', token: owner, body: { rangeOverrides: { pH: { watchBelow: 6.8, watchAbove: 8.4 } } } })
    expect(edit.status, JSON.stringify(edit.body)).toBe(200)
    await expectFresh('the feature\'s ranges changed')
    const [profile] = await testDb().insert(schema.rangeProfiles).values({ companyId, key: 'water_garden', name: 'Our water gardens', ranges: { khMgL: { watchBelow: 60, source: 'set by the company' } } }).returning()
    await expectFresh('a range profile made')
    const patched = await api(`/api/range-profiles/${profile!.id}`, { method: 'PATCH', token: owner, body: { ranges: { khMgL: { watchBelow: 70, actBelow: 40 } } } })
    expect(patched.status, JSON.stringify(patched.body)).toBe(200)
    await expectFresh('a range profile edited')

    // The company's units (the series stay in SI) and its time zone (the windows' days).
    const units = await api('/api/company', { method: 'PATCH', token: owner, body: { unitSystem: 'metric' } })
    expect(units.status, JSON.stringify(units.body)).toBe(200)
    await expectFresh('the company\'s units changed')
    const zone = await api('/api/company', { method: 'PATCH', token: owner, body: { timeZone: 'Pacific/Kiritimati' } })
    expect(zone.status, JSON.stringify(zone.body)).toBe(200)
    await expectFresh('the company\'s time zone changed')

    await testDb().delete(schema.doses).where(eq(schema.doses.featureId, featureId))
    await testDb().delete(schema.readings).where(eq(schema.readings.id, last!.id))
    await expectFresh('a dose and a reading deleted')
  })
})
