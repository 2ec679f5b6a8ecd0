import { DateTime } from 'luxon'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'

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
    expect(Date.parse(b.to) - Date.parse(b.from!)).toBe(365 * 86_400_000)
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
