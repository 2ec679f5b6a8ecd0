// The demo season as the seed leaves it (tests/setup/server.ts seeds on the day the tests run,
// and CI runs them again under faketime on other dates): planned by the planner, never over a
// technician's capacity, alive today. Only the demo's own visits are looked at (its customers on
// its plans, not moved by hand, and its two technicians), so what other test files add does not count.
import { describe, expect, inject, it } from 'vitest'
import pg from 'pg'
import { localToday } from '../../shared/utils/company-time'
import { dayLoad } from '../../shared/utils/day-load'
import { demoCustomers } from '../../scripts/seed/demo-data'
import { demoPlans } from '../../scripts/seed/demo-plans'
import { demo } from '../helpers/api'

interface DemoVisit { id: string, technician: string | null, day: string, minutes: number, status: string, type: string, lat: number | null, lon: number | null, reason: string | null }

async function demoSeason() {
  const c = new pg.Client({ connectionString: inject('databaseUrl') })
  await c.connect()
  try {
    const company = (await c.query(`select id, time_zone, working_days from companies where name = 'Heronmere Water Gardens'`)).rows[0]
    const techs = (await c.query(`select u.id, u.name, s.capacity_minutes as capacity, s.home_latitude as lat, s.home_longitude as lon
      from users u join staff_profiles s on s.user_id = u.id where u.company_id = $1 and u.role = 'technician' and u.email = any($2)`, [company.id, [demo.tess, demo.dario]])).rows
    const closed = new Set((await c.query(`select day::text as day from closed_days where company_id = $1`, [company.id])).rows.map(r => r.day))
    const visits: DemoVisit[] = (await c.query(`select v.id, v.technician_id as technician, v.scheduled_on::text as day, v.duration_minutes as minutes,
        v.status, v.visit_type as type, s.latitude as lat, s.longitude as lon, v.unplaced_reason as reason
      from visits v join sites s on s.id = v.site_id join contracts k on k.id = v.contract_id join plans p on p.id = k.plan_id join customers cu on cu.id = v.customer_id
      where v.company_id = $1 and not v.moved_manually and v.status <> 'cancelled' and p.name = any($2) and cu.name = any($3)`,
    [company.id, demoPlans.map(p => p.name), demoCustomers.map(x => x.name)])).rows
    return { company, techs, closed, visits }
  }
  finally {
    await c.end()
  }
}

describe('demo season', () => {
  it('has no technician-day over capacity, counting visits and driving', async () => {
    const { techs, visits } = await demoSeason()
    expect(visits.length, 'the demo has two seasons of visits').toBeGreaterThan(500)
    const days = new Map<string, DemoVisit[]>()
    for (const v of visits) if (v.technician) days.set(`${v.technician}|${v.day}`, [...(days.get(`${v.technician}|${v.day}`) ?? []), v])
    const over: string[] = []
    for (const [key, stops] of days) {
      const t = techs.find(x => x.id === key.split('|')[0])!
      // The board's own load (shared/utils/day-load.ts): visit minutes + driving from home.
      const load = dayLoad(stops.map(s => ({ id: s.id, durationMinutes: s.minutes, lat: s.lat, lon: s.lon })), { lat: t.lat, lon: t.lon }, t.capacity)
      if (load.over) over.push(`${t.name} ${key.split('|')[1]}: ${Math.round(load.totalMinutes)} of ${t.capacity} min`)
    }
    expect(over).toEqual([])
    // Both technicians share the book (the planner, not one person taking everyone).
    for (const t of techs) expect(visits.filter(v => v.technician === t.id).length, t.name).toBeGreaterThan(visits.length / 5)
  })

  it("gives each technician stops on the company's today when it is a working day, winter checks in winter", async () => {
    const { company, techs, closed, visits } = await demoSeason()
    const today = localToday(company.time_zone)
    const weekday = new Date(`${today}T12:00:00Z`).getUTCDay() || 7
    const todays = visits.filter(v => v.day === today)
    if (!company.working_days.includes(weekday) || closed.has(today)) {
      expect(todays.filter(v => v.technician), 'nobody works a day off').toEqual([])
      return
    }
    for (const t of techs) {
      const mine = todays.filter(v => v.technician === t.id)
      expect(mine.length, `${t.name} has stops today (${today})`).toBeGreaterThan(0)
      expect(mine.every(v => ['scheduled', 'in_progress'].includes(v.status)), `${t.name}'s stops today are still to do`).toBe(true)
    }
    const month = Number(today.slice(5, 7))
    if ([12, 1, 2].includes(month)) expect(new Set(todays.map(v => v.type))).toEqual(new Set(['water_test']))
  })

  it('has past visits done or skipped, and no unassigned visit without the reason', async () => {
    const { company, visits } = await demoSeason()
    const today = localToday(company.time_zone)
    expect(visits.filter(v => v.day < today && v.status === 'scheduled').map(v => `${v.day} ${v.type}`)).toEqual([])
    expect(visits.filter(v => v.day > today).every(v => v.status === 'scheduled')).toBe(true)
    expect(visits.filter(v => !v.technician && !v.reason).map(v => `${v.day} ${v.type}`)).toEqual([])
  })
})
