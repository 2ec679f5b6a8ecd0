// The season planner on the large invented company itself (npm run db:seed:scale): its current
// season's visits as they are in the database, each with the window of its plan template
// (windowVisitDates, as activation computes them), its site's position, the company's
// technicians with their capacity and homes, its working days and closed days. planSeason and
// planSeasonBaseline plan the whole season from scratch; nothing is written back.
import type pg from 'pg'
import { windowVisitDates } from '../server/services/visit-generation'
import { planSeason, planSeasonBaseline, type PlannerInput, type PlannerTechnician, type PlannerVisit, type SeasonPlan } from '../shared/utils/planner/index'

export const SEASON_BUDGET = { seconds: 60, daysOverCapacity: 0 }

type Say = (m: string) => void

/** The company's current season as planner input (the contracts whose term holds today). */
export async function loadScaleSeason(c: pg.Client, companyId: string): Promise<{ input: PlannerInput, term: { start: string, end: string } }> {
  const { rows: [company] } = await c.query(`select working_days, base_latitude as lat, base_longitude as lon, (now() at time zone time_zone)::date::text as today from companies where id = $1`, [companyId])
  const { rows: [term] } = await c.query(`select term_start::text as start, term_end::text as "end" from contracts where company_id = $1 and term_start <= $2::date and term_end >= $2::date
    group by 1, 2 order by count(*) desc limit 1`, [companyId, company.today])
  const closedDays = (await c.query(`select day::text as day from closed_days where company_id = $1 and day between $2::date and $3::date`, [companyId, term.start, term.end])).rows.map(r => r.day as string)
  const { rows: templates } = await c.query(`select id, plan_id as "planId", position, visit_type as "visitType", rrule, season_from as "seasonFrom", season_to as "seasonTo", tolerance_days as "toleranceDays", duration_minutes as "durationMinutes"
    from plan_visit_templates where plan_id in (select id from plans where company_id = $1)`, [companyId])
  const { rows: techs } = await c.query(`select u.id, u.name, coalesce(s.capacity_minutes, 420) as capacity, coalesce(s.home_latitude, $2) as lat, coalesce(s.home_longitude, $3) as lon
    from users u left join staff_profiles s on s.user_id = u.id where u.company_id = $1 and u.role = 'technician' and u.active order by u.name`, [companyId, company.lat ?? 0, company.lon ?? 0])
  const { rows } = await c.query(`select v.id, v.generation_key as key, v.customer_id as customer, v.site_id as site, v.duration_minutes as minutes, ct.plan_id as plan,
      coalesce(s.latitude, $4) as lat, coalesce(s.longitude, $5) as lon
    from visits v join contracts ct on ct.id = v.contract_id join sites s on s.id = v.site_id
    where v.company_id = $1 and ct.term_start = $2::date and ct.term_end = $3::date and v.status <> 'cancelled' and v.generation_key is not null`,
  [companyId, term.start, term.end, company.lat ?? 0, company.lon ?? 0])
  const cal = { workingDays: company.working_days as number[], closed: new Set(closedDays) }
  const windows = new Map<string, Map<string, { earliest: string, latest: string, preferred: string }>>()
  for (const planId of new Set(templates.map(t => t.planId as string))) {
    const dates = windowVisitDates(templates.filter(t => t.planId === planId) as Parameters<typeof windowVisitDates>[0], term, cal)
    windows.set(planId, new Map(dates.map(d => [d.key, { earliest: d.earliest, latest: d.latest, preferred: d.date }])))
  }
  const visits: PlannerVisit[] = []
  for (const r of rows) {
    const w = windows.get(r.plan)?.get(String(r.key).slice(0, String(r.key).lastIndexOf(':')))
    if (!w) continue
    visits.push({ id: r.id, windowEarliest: w.earliest, windowLatest: w.latest, preferred: w.preferred, durationMinutes: Math.max(1, r.minutes), siteId: r.site, customerId: r.customer, lat: r.lat, lon: r.lon })
  }
  const technicians: PlannerTechnician[] = techs.map(t => ({ id: t.id, name: t.name, capacityMinutes: t.capacity, workingDays: cal.workingDays, home: { lat: t.lat, lon: t.lon } }))
  return { input: { visits, technicians, closedDays }, term }
}

function capacityMinutes(input: PlannerInput, term: { start: string, end: string }) {
  const closed = new Set(input.closedDays)
  let total = 0
  for (let d = Date.parse(`${term.start}T00:00:00Z`); d <= Date.parse(`${term.end}T00:00:00Z`); d += 86_400_000) {
    const day = new Date(d).toISOString().slice(0, 10)
    const wd = new Date(d).getUTCDay() || 7
    for (const t of input.technicians) if (t.workingDays.includes(wd) && !closed.has(day)) total += t.capacityMinutes
  }
  return total
}

function summary(plan: SeasonPlan, seconds: number) {
  return { seconds, placed: plan.stats.placed, unplaced: plan.stats.unplaced, unplacedByCode: plan.stats.unplacedByCode, daysOverCapacity: plan.stats.daysOverCapacity,
    technicianDays: plan.stats.technicianDays, totalKm: Math.round(plan.stats.totalKm), kmPerPlacedVisit: plan.stats.placed ? plan.stats.totalKm / plan.stats.placed : 0,
    driveHours: Math.round(plan.stats.totalDriveMinutes / 60), customersWithOneTechnician: plan.stats.customersWithOneTechnician }
}

/** Unplaced visits grouped by their reason's code and window month (the reasons' own words name the window). */
function unplacedGroups(plan: SeasonPlan, input: PlannerInput) {
  const byId = new Map(input.visits.map(v => [v.id, v]))
  const groups: Record<string, number> = {}
  for (const u of plan.unplaced) {
    const k = `${u.code}, window from ${byId.get(u.visitId)!.windowEarliest.slice(0, 7)}`
    groups[k] = (groups[k] ?? 0) + 1
  }
  return { groups, examples: plan.unplaced.slice(0, 3).map(u => u.reason) }
}

export async function runSeasonBench(c: pg.Client, companyId: string, say: Say) {
  say('season: reading the large company\'s season…')
  const { input, term } = await loadScaleSeason(c, companyId)
  const demand = input.visits.reduce((s, v) => s + v.durationMinutes, 0)
  const capacity = capacityMinutes(input, term)
  const customers = new Set(input.visits.map(v => v.customerId)).size
  say(`season: ${input.visits.length} visits of ${customers} customers, ${input.technicians.length} technicians, ${term.start} to ${term.end}; visit time ${(demand / capacity * 100).toFixed(0)} % of their time`)
  let t = performance.now()
  const plan = planSeason(input)
  const planner = summary(plan, (performance.now() - t) / 1000)
  t = performance.now()
  const base = planSeasonBaseline(input)
  const baseline = summary(base, (performance.now() - t) / 1000)
  const savingPercent = baseline.totalKm > 0 ? (1 - planner.totalKm / baseline.totalKm) * 100 : 0
  const result = {
    at: new Date().toISOString(),
    data: { source: 'the large invented company (db:seed:scale), its current season', visits: input.visits.length, customers, technicians: input.technicians.length, season: term,
      closedDays: input.closedDays?.length ?? 0, visitMinutes: demand, capacityMinutes: capacity },
    budgets: SEASON_BUDGET,
    planner, baseline, savingPercent,
    unplaced: unplacedGroups(plan, input),
    baselineUnplaced: unplacedGroups(base, input).groups,
    met: { seconds: planner.seconds < SEASON_BUDGET.seconds, daysOverCapacity: planner.daysOverCapacity <= SEASON_BUDGET.daysOverCapacity, drivesLess: planner.totalKm < baseline.totalKm },
  }
  const ok = (b: boolean) => (b ? 'met' : 'MISSED')
  say(`season: time ${planner.seconds.toFixed(1)} s (budget < ${SEASON_BUDGET.seconds} s): ${ok(result.met.seconds)}`)
  say(`season: technician-days over capacity ${planner.daysOverCapacity} (budget ${SEASON_BUDGET.daysOverCapacity}): ${ok(result.met.daysOverCapacity)}`)
  say(`season: unplaced ${planner.unplaced} of ${input.visits.length}: ${JSON.stringify(result.unplaced.groups)}; baseline ${baseline.unplaced}`)
  say(`season: driving ${planner.totalKm} km vs baseline ${baseline.totalKm} km: ${savingPercent.toFixed(1)} % less (budget: less than the baseline): ${ok(result.met.drivesLess)}`)
  return result
}
