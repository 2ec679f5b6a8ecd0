import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { orderStops, routeLengthKm, ROUTE_ASSUMPTIONS } from '../../shared/utils/route-order'
import { api, demo, tokenFor } from '../helpers/api'

let owner: string
let pool: pg.Pool
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
})
afterAll(async () => {
  await pool.end()
})

describe('the season planner on activation', () => {
  it('30 customers signed onto the busiest plan on one day: no technician-day over capacity, every visit placed or explained', async () => {
    const today = (await api('/api/today', { token: owner })).body.date as string
    // A term two years on: computed from the app's today, never from the test machine's clock.
    const year = Number(today.slice(0, 4)) + 2
    const plans = (await api('/api/plans?pageSize=50', { token: owner })).body.rows as Array<{ id: string, name: string }>
    const koi = plans.find(p => p.name === 'Koi Keeper, all year')!
    expect(koi).toBeTruthy()
    const contractIds: string[] = []
    for (let i = 0; i < 30; i++) {
      const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Planner Customer ${i}`, kind: 'household' } })
      // Two areas some 20 km apart, so the routes have real driving in them.
      const lat = (i % 2 ? 44.05 : 44.23) + (i % 5) * 0.004
      const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: `${i} Planner Row`, city: 'Larchfield', latitude: lat, longitude: -91.34 + (i % 7) * 0.004 } })
      const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Koi pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 1.2 } } })
      const k = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: koi.id, featureIds: [f.body.id], termStart: `${year}-01-01` } })
      expect(k.status, JSON.stringify(k.body)).toBe(201)
      const a = await api(`/api/contracts/${k.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
      expect(a.status, JSON.stringify(a.body)).toBe(200)
      expect(Array.isArray(a.body.visits.unplaced)).toBe(true)
      for (const u of a.body.visits.unplaced) expect(u.reason.length).toBeGreaterThan(10)
      contractIds.push(k.body.id)
    }
    const { rows } = await pool.query(
      `select v.id, v.scheduled_on::text as day, v.technician_id, v.unplaced_reason, v.duration_minutes, s.latitude, s.longitude
       from visits v join sites s on s.id = v.site_id where v.contract_id = any($1::uuid[]) and v.status = 'scheduled'`, [contractIds])
    expect(rows.length).toBeGreaterThan(30 * 20)
    // Placed (a technician) or explained (a reason), never neither.
    for (const v of rows) expect(v.technician_id !== null || (v.unplaced_reason ?? '').length > 0, v.id).toBe(true)
    const placed = rows.filter(v => v.technician_id)
    expect(placed.length / rows.length).toBeGreaterThan(0.9)
    // Each technician-day, with every scheduled visit of the company that day: visits plus driving
    // (great-circle km × detour at the stated speed, ROUTE_ASSUMPTIONS; common practice, no source) within capacity.
    const techs = (await pool.query(`select u.id, coalesce(p.capacity_minutes, 420) as capacity, coalesce(p.home_latitude, c.base_latitude) as lat, coalesce(p.home_longitude, c.base_longitude) as lon
      from users u join companies c on c.id = u.company_id left join staff_profiles p on p.user_id = u.id where u.role = 'technician' and u.company_id = (select company_id from contracts where id = $1)`, [contractIds[0]])).rows
    const days = [...new Set(placed.map(v => `${v.technician_id}|${v.day}`))]
    let checked = 0
    for (const key of days) {
      const [tech, day] = key.split('|')
      const t = techs.find(x => x.id === tech)!
      const all = (await pool.query(`select v.id, v.duration_minutes, s.latitude, s.longitude from visits v join sites s on s.id = v.site_id where v.technician_id = $1 and v.scheduled_on = $2 and v.status = 'scheduled'`, [tech, day])).rows
      const stops = all.map(v => ({ id: v.id as string, lat: v.latitude as number, lon: v.longitude as number }))
      const home = { lat: t.lat as number, lon: t.lon as number }
      const order = orderStops(home, stops)
      const km = routeLengthKm(home, order.map(id => stops.find(s => s.id === id)!)) * ROUTE_ASSUMPTIONS.detourFactor
      const minutes = all.reduce((n, v) => n + v.duration_minutes, 0) + km / ROUTE_ASSUMPTIONS.speedKmh * 60
      expect(minutes, `${key}: ${minutes.toFixed(0)} of ${t.capacity} minutes`).toBeLessThanOrEqual(t.capacity + 1)
      checked++
    }
    expect(checked).toBeGreaterThan(20)
  })
})

describe('plan these weeks again', () => {
  it('the preview changes nothing; applying with its token applies exactly it; a moved visit never moves', async () => {
    const today = (await api('/api/today', { token: owner })).body.date as string
    const year = Number(today.slice(0, 4)) + 2
    const range = { from: `${year}-05-03`, to: `${year}-05-16` }
    const snapshot = async () => (await pool.query(`select id, scheduled_on::text as day, technician_id from visits where status = 'scheduled' and scheduled_on between $1 and $2 order by id`, [range.from, range.to])).rows
    // Put one visit of the range on a day by hand: it must stay there.
    const [one] = await snapshot()
    expect(one).toBeTruthy()
    const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string }>
    const handDay = `${year}-05-05`
    const moved = await api(`/api/visits/${one.id}`, { method: 'PATCH', token: owner, body: { scheduledOn: handDay, technicianId: techs[0]!.id, moveReason: 'Customer asked for this day' } })
    expect(moved.status, JSON.stringify(moved.body)).toBe(200)
    const before = await snapshot()

    const p = await api('/api/schedule/replan', { method: 'POST', token: owner, body: range })
    expect(p.status, JSON.stringify(p.body)).toBe(200)
    expect(p.body.applied).toBe(false)
    expect(typeof p.body.token).toBe('string')
    expect(await snapshot()).toEqual(before)
    expect(p.body.moves.some((m: { visitId: string }) => m.visitId === one.id)).toBe(false)

    const a = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...range, apply: true, token: p.body.token } })
    expect(a.status, JSON.stringify(a.body)).toBe(200)
    expect(a.body.moves).toEqual(p.body.moves)
    const after = await snapshot()
    for (const m of p.body.moves as Array<{ visitId: string, to: { day: string, technicianId: string } | null }>) {
      const v = after.find(x => x.id === m.visitId)
      if (m.to) expect(v, m.visitId).toMatchObject({ day: m.to.day, technician_id: m.to.technicianId })
    }
    expect(after.find(x => x.id === one.id)).toMatchObject({ day: handDay, technician_id: techs[0]!.id })
    // The same token again: the schedule changed since that preview.
    if (p.body.moves.length) expect((await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...range, apply: true, token: p.body.token } })).status).toBe(409)
  })

  it('owner only; bad input is 400 naming the field', async () => {
    const tess = await tokenFor(demo.tess)
    const priya = await tokenFor(demo.priya)
    expect((await api('/api/schedule/replan', { method: 'POST', token: tess, body: { from: '2030-05-01', to: '2030-05-14' } })).status).toBe(403)
    expect((await api('/api/schedule/replan', { method: 'POST', token: priya, body: { from: '2030-05-01', to: '2030-05-14' } })).status).toBe(403)
    expect((await api('/api/schedule/unplaced?from=2030-05-01&to=2030-05-14', { token: tess })).status).toBe(403)
    const long = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { from: '2030-01-01', to: '2030-12-31' } })
    expect(long.status).toBe(400)
    expect(long.body.data.fields.to).toMatch(/at most 183 days/)
    const noToken = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { from: '2030-05-01', to: '2030-05-14', apply: true } })
    expect(noToken.status).toBe(400)
    expect(noToken.body.data.fields.token).toBeTruthy()
    const badDate = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { from: 'soon', to: '2030-05-14' } })
    expect(badDate.status).toBe(400)
    expect(badDate.body.data.fields.from).toBeTruthy()
    const tray = await api('/api/schedule/unplaced?from=2030-05-01&to=2030-05-14', { token: owner })
    expect(tray.status).toBe(200)
    expect(Array.isArray(tray.body.rows)).toBe(true)
  })
})
