// The season planner at scale, on invented data: 5,000 customers over a region about 80 km
// across with a few denser towns, ~185,000 visits from a mix of plan templates over the 2027
// season, 28 technicians (6.5–8 h a day, Monday to Friday, a few closed days and days off).
// Deterministic: a seeded generator, the same data every run. Pure: no database, no server.
//
// Run alone: npm run bench -- --only planner   (or: npx tsx bench/planner.ts)
import { planSeason, planSeasonBaseline, type PlannerInput, type PlannerTechnician, type PlannerVisit, type SeasonPlan } from '../shared/utils/planner/index'
import { buildVisitSchedule, expandVisitSchedule, type VisitScheduleForm } from '../shared/utils/visit-windows'
import { seeded } from '../scripts/seed/scale-book'

export const PLANNER_BUDGET = { seconds: 60, daysOverCapacity: 0 }


interface Template { name: string, form: VisitScheduleForm, minutes: number }
/** Plans with their visit templates and the share of customers on each. Short weekly checks keep the work within the technicians' time. */
const PLANS: Array<{ name: string, share: number, templates: Template[] }> = [
  { name: 'Weekly care', share: 0.55, templates: [
    { name: 'weekly check', form: { kind: 'every', interval: 1, unit: 'week', from: '03-25', to: '10-31', toleranceDays: 2 }, minutes: 6 },
    { name: 'spring clean-out', form: { kind: 'once', from: '03-15', to: '04-30' }, minutes: 60 },
    { name: 'fall shutdown', form: { kind: 'once', from: '10-15', to: '11-15' }, minutes: 40 },
    { name: 'winter check', form: { kind: 'every', interval: 1, unit: 'month', from: '12-01', to: '02-28', toleranceDays: 7 }, minutes: 8 },
  ] },
  { name: 'Full care', share: 0.37, templates: [
    { name: 'weekly water test', form: { kind: 'every', interval: 1, unit: 'week', from: '05-01', to: '09-30', toleranceDays: 2 }, minutes: 6 },
    { name: 'routine maintenance', form: { kind: 'every', interval: 2, unit: 'week', from: '04-01', to: '10-31', toleranceDays: 3 }, minutes: 15 },
    { name: 'spring clean-out', form: { kind: 'once', from: '03-15', to: '04-30' }, minutes: 60 },
    { name: 'fall shutdown', form: { kind: 'once', from: '10-15', to: '11-15' }, minutes: 40 },
  ] },
  { name: 'Seasonal', share: 0.08, templates: [
    { name: 'routine maintenance', form: { kind: 'every', interval: 4, unit: 'week', from: '03-01', to: '11-30', toleranceDays: 5 }, minutes: 30 },
    { name: 'spring clean-out', form: { kind: 'once', from: '03-15', to: '04-30' }, minutes: 60 },
    { name: 'mid-season check', form: { kind: 'once', from: '07-01', to: '07-31' }, minutes: 30 },
    { name: 'fall shutdown', form: { kind: 'once', from: '10-15', to: '11-15' }, minutes: 40 },
  ] },
]
const TERM = { start: '2027-01-01', end: '2027-12-31' }
const CLOSED = ['2027-01-01', '2027-05-31', '2027-07-05', '2027-09-06', '2027-11-25', '2027-11-26', '2027-12-24']
const CENTRE = { lat: 41.75, lon: -88.2 }
/** Degrees for ±40 km around the centre (1° latitude ≈ 111.2 km). */
const HALF_LAT = 40 / 111.2
const HALF_LON = 40 / (111.2 * Math.cos((CENTRE.lat * Math.PI) / 180))

export function generatePlannerCompany(customers = 5000, technicians = 28, seed = 20270101): PlannerInput {
  const rnd = seeded(seed)
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd())
  const towns = Array.from({ length: 8 }, () => ({ lat: CENTRE.lat + (rnd() * 1.5 - 0.75) * HALF_LAT, lon: CENTRE.lon + (rnd() * 1.5 - 0.75) * HALF_LON, km: 2 + rnd() * 3 }))
  const place = () => {
    if (rnd() < 0.75) {
      const t = towns[Math.floor(rnd() * towns.length)]!
      return { lat: t.lat + (gauss() * t.km) / 111.2, lon: t.lon + (gauss() * t.km) / (111.2 * Math.cos((t.lat * Math.PI) / 180)) }
    }
    return { lat: CENTRE.lat + (rnd() * 2 - 1) * HALF_LAT, lon: CENTRE.lon + (rnd() * 2 - 1) * HALF_LON }
  }
  const windowsOf = PLANS.map(p => p.templates.map(t => ({ t, windows: expandVisitSchedule(buildVisitSchedule(t.form), TERM) })))
  const visits: PlannerVisit[] = []
  for (let c = 0; c < customers; c++) {
    const at = place()
    const r = rnd()
    let planIndex = 0
    for (let acc = 0; planIndex < PLANS.length - 1 && r >= (acc += PLANS[planIndex]!.share); planIndex++);
    for (const [k, { t, windows }] of windowsOf[planIndex]!.entries()) {
      for (const w of windows) {
        visits.push({ id: `c${c}:${k}:${w.key}`, windowEarliest: w.earliest, windowLatest: w.latest, preferred: w.preferred, durationMinutes: t.minutes, siteId: `s${c}`, customerId: `c${c}`, lat: at.lat, lon: at.lon })
      }
    }
  }
  const techs: PlannerTechnician[] = Array.from({ length: technicians }, (_, i) => {
    const week = 1 + Math.floor(rnd() * 8) // a week off in the winter months
    const start = Date.UTC(2027, 0, 4) + (week * 7 + (rnd() < 0.5 ? 0 : 40 * 7)) * 86_400_000
    return {
      id: `t${i + 1}`, name: `Technician ${i + 1}`, capacityMinutes: 390 + 15 * Math.floor(rnd() * 7), workingDays: [1, 2, 3, 4, 5],
      daysOff: Array.from({ length: 5 }, (_, d) => new Date(start + d * 86_400_000).toISOString().slice(0, 10)), home: place(),
    }
  })
  return { visits, technicians: techs, closedDays: CLOSED, speedKmh: 40, detourFactor: 1.3 }
}

function capacityMinutes(input: PlannerInput) {
  const closed = new Set(input.closedDays)
  let total = 0
  for (const t of input.technicians) {
    const off = new Set(t.daysOff)
    for (let d = Date.UTC(2027, 0, 1); d <= Date.UTC(2027, 11, 31); d += 86_400_000) {
      const day = new Date(d).toISOString().slice(0, 10)
      const wd = new Date(d).getUTCDay() || 7
      if (t.workingDays.includes(wd) && !closed.has(day) && !off.has(day)) total += t.capacityMinutes
    }
  }
  return total
}

/** Share of the technicians' time (visits and driving) used, per month. */
function monthlyUse(input: PlannerInput, plan: SeasonPlan) {
  const closed = new Set(input.closedDays)
  const room: Record<string, number> = {}
  for (const t of input.technicians) {
    const off = new Set(t.daysOff)
    for (let d = Date.UTC(2027, 0, 1); d <= Date.UTC(2027, 11, 31); d += 86_400_000) {
      const day = new Date(d).toISOString().slice(0, 10)
      if (t.workingDays.includes(new Date(d).getUTCDay() || 7) && !closed.has(day) && !off.has(day)) room[day.slice(0, 7)] = (room[day.slice(0, 7)] ?? 0) + t.capacityMinutes
    }
  }
  const used: Record<string, number> = {}
  for (const d of plan.days) used[d.day.slice(0, 7)] = (used[d.day.slice(0, 7)] ?? 0) + d.visitMinutes + d.driveMinutes
  return Object.fromEntries(Object.keys(room).sort().map(m => [m, Math.round(((used[m] ?? 0) / room[m]!) * 100) / 100]))
}

function summary(plan: SeasonPlan, seconds: number) {
  return { seconds, placed: plan.stats.placed, unplaced: plan.stats.unplaced, unplacedByCode: plan.stats.unplacedByCode, daysOverCapacity: plan.stats.daysOverCapacity,
    technicianDays: plan.stats.technicianDays, totalKm: Math.round(plan.stats.totalKm), kmPerPlacedVisit: plan.stats.placed ? plan.stats.totalKm / plan.stats.placed : 0,
    driveHours: Math.round(plan.stats.totalDriveMinutes / 60), customersWithOneTechnician: plan.stats.customersWithOneTechnician }
}

export function runPlannerBench(say: (m: string) => void = m => process.stderr.write(`[bench] ${m}\n`)) {
  say('planner: generating the season…')
  const input = generatePlannerCompany()
  const demand = input.visits.reduce((s, v) => s + v.durationMinutes, 0)
  const capacity = capacityMinutes(input)
  say(`planner: ${input.visits.length} visits, ${new Set(input.visits.map(v => v.customerId)).size} customers, ${input.technicians.length} technicians; visit time ${(demand / capacity * 100).toFixed(0)} % of capacity`)
  let t = performance.now()
  const plan = planSeason(input)
  const planner = summary(plan, (performance.now() - t) / 1000)
  say(`planner: planned in ${planner.seconds.toFixed(1)} s`)
  t = performance.now()
  const base = planSeasonBaseline(input)
  const baseline = summary(base, (performance.now() - t) / 1000)
  say(`planner: baseline in ${baseline.seconds.toFixed(1)} s`)
  // The same season with 40 technicians: enough time for nearly everything, to show what the
  // planner does when capacity suffices.
  const roomyInput = generatePlannerCompany(5000, 40)
  t = performance.now()
  const roomyPlan = planSeason(roomyInput)
  const roomy = summary(roomyPlan, (performance.now() - t) / 1000)
  const roomyBase = summary(planSeasonBaseline(roomyInput), 0)
  say(`planner: with 40 technicians ${roomy.unplaced} unplaced, ${roomy.daysOverCapacity} days over capacity, ${roomy.totalKm} km against the baseline's ${roomyBase.totalKm} km (${roomyBase.unplaced} unplaced)`)
  const savingPercent = baseline.totalKm > 0 ? (1 - planner.totalKm / baseline.totalKm) * 100 : 0
  const savingPerVisitPercent = baseline.kmPerPlacedVisit > 0 ? (1 - planner.kmPerPlacedVisit / baseline.kmPerPlacedVisit) * 100 : 0
  const result = {
    at: new Date().toISOString(),
    data: { visits: input.visits.length, customers: new Set(input.visits.map(v => v.customerId)).size, technicians: input.technicians.length, season: TERM, closedDays: CLOSED.length,
      visitMinutes: demand, capacityMinutes: capacity, plans: PLANS.map(p => ({ name: p.name, share: p.share, templates: p.templates.map(x => `${x.name} (${x.minutes} min)`) })), speedKmh: 40, detourFactor: 1.3 },
    budgets: PLANNER_BUDGET,
    planner, baseline, savingPercent, savingPerVisitPercent,
    /** Share of the 28 technicians' time used each month: the unplaced visits fall in months that are full. */
    monthlyUse: monthlyUse(input, plan),
    withFortyTechnicians: { planner: roomy, baseline: { unplaced: roomyBase.unplaced, totalKm: roomyBase.totalKm, kmPerPlacedVisit: roomyBase.kmPerPlacedVisit }, savingPercent: roomyBase.totalKm > 0 ? (1 - roomy.totalKm / roomyBase.totalKm) * 100 : 0 },
    met: { seconds: planner.seconds < PLANNER_BUDGET.seconds, daysOverCapacity: planner.daysOverCapacity <= PLANNER_BUDGET.daysOverCapacity, drivesLess: planner.totalKm < baseline.totalKm },
  }
  const ok = (b: boolean) => (b ? 'met' : 'MISSED')
  say(`planner: time ${planner.seconds.toFixed(1)} s (budget < ${PLANNER_BUDGET.seconds} s): ${ok(result.met.seconds)}`)
  say(`planner: technician-days over capacity ${planner.daysOverCapacity} (budget ${PLANNER_BUDGET.daysOverCapacity}): ${ok(result.met.daysOverCapacity)}`)
  say(`planner: visits unplaced ${planner.unplaced} of ${input.visits.length} (${JSON.stringify(planner.unplacedByCode)}); baseline ${baseline.unplaced}`)
  say(`planner: driving ${planner.totalKm} km vs baseline ${baseline.totalKm} km: ${savingPercent.toFixed(1)} % less (budget: less than the baseline): ${ok(result.met.drivesLess)}; per placed visit ${planner.kmPerPlacedVisit.toFixed(2)} vs ${baseline.kmPerPlacedVisit.toFixed(2)} km (${savingPerVisitPercent.toFixed(1)} % less)`)
  return result
}

if (import.meta.url === `file://${process.argv[1]}`) {
  console.log(JSON.stringify(runPlannerBench(), null, 2))
}
