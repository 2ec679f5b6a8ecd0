import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { PLANNER_STEP_VISITS, planSeason, planSeasonBaseline, planSeasonSteps, replanDateRange, replanDateRangeSteps, type PlannerInput, type PlannerProgress, type PlannerSteps, type SeasonPlan } from '../../shared/utils/planner/index'
import { routeLegs } from '../../shared/utils/route-order'

// Random small companies over three fixed weeks (Monday 5 April – Sunday 25 April 2027);
// nothing depends on today's date.
const DAYS = Array.from({ length: 21 }, (_, i) => new Date(Date.UTC(2027, 3, 5 + i)).toISOString().slice(0, 10))
const isoWeekday = (d: string) => new Date(`${d}T00:00:00Z`).getUTCDay() || 7

const dayIndex = fc.integer({ min: 0, max: DAYS.length - 1 })
const position = fc.record({ lat: fc.double({ min: 44.9, max: 45.1, noNaN: true }), lon: fc.double({ min: -93.2, max: -92.8, noNaN: true }) })

const company = (withLocks: boolean, maxVisits = 40) => fc.record({
  techs: fc.array(fc.record({
    capacityMinutes: fc.integer({ min: 60, max: 480 }),
    workingDays: fc.subarray([1, 2, 3, 4, 5, 6, 7]),
    daysOff: fc.subarray(DAYS, { maxLength: 4 }),
    home: position,
  }), { minLength: 1, maxLength: 3 }),
  closed: fc.subarray(DAYS, { maxLength: 3 }),
  visits: fc.array(fc.record({
    a: dayIndex, b: dayIndex, p: fc.double({ min: 0, max: 1, noNaN: true }),
    durationMinutes: fc.integer({ min: 5, max: 240 }), at: position, customer: fc.integer({ min: 0, max: 6 }),
    lock: withLocks ? fc.option(fc.record({ day: dayIndex, tech: fc.nat() }), { freq: 4 }) : fc.constant(null),
  }), { maxLength: maxVisits }),
  speedKmh: fc.integer({ min: 15, max: 80 }),
  detourFactor: fc.double({ min: 1, max: 2, noNaN: true }),
}).map(({ techs, closed, visits, speedKmh, detourFactor }): PlannerInput => ({
  technicians: techs.map((t, i) => ({ id: `t${i}`, ...t })),
  closedDays: closed,
  speedKmh,
  detourFactor,
  visits: visits.map((v, i) => {
    const lo = Math.min(v.a, v.b)
    const hi = Math.max(v.a, v.b)
    return {
      id: `v${i}`, windowEarliest: DAYS[lo]!, windowLatest: DAYS[hi]!, preferred: DAYS[lo + Math.floor(v.p * (hi - lo))]!,
      durationMinutes: v.durationMinutes, siteId: `s${i}`, customerId: `c${v.customer}`, lat: v.at.lat, lon: v.at.lon,
      ...(v.lock ? { locked: { day: DAYS[v.lock.day]!, technicianId: `t${v.lock.tech % techs.length}` } } : {}),
    }
  }),
}))

function checkPlan(input: PlannerInput, plan: SeasonPlan) {
  // Every visit exactly once: placed, or unplaced with a reason.
  const ids = [...plan.placed.map(p => p.visitId), ...plan.unplaced.map(u => u.visitId)]
  expect(ids.sort()).toEqual(input.visits.map(v => v.id).sort())
  for (const u of plan.unplaced) expect(u.reason.length).toBeGreaterThan(10)

  const visits = new Map(input.visits.map(v => [v.id, v]))
  const techs = new Map(input.technicians.map(t => [t.id, t]))
  const closed = new Set(input.closedDays)
  for (const p of plan.placed) {
    const v = visits.get(p.visitId)!
    if (v.locked) {
      expect({ day: p.day, technicianId: p.technicianId }).toEqual(v.locked)
      continue
    }
    const t = techs.get(p.technicianId)!
    expect(p.day >= v.windowEarliest && p.day <= v.windowLatest).toBe(true)
    expect(t.workingDays).toContain(isoWeekday(p.day))
    expect(closed.has(p.day)).toBe(false)
    expect(t.daysOff ?? []).not.toContain(p.day)
  }

  // Each day's reported figures are its true route (route-order.ts), and within capacity unless locked visits alone fill it.
  const stops = new Map<string, typeof plan.placed>()
  for (const p of plan.placed) stops.set(`${p.day}|${p.technicianId}`, [...(stops.get(`${p.day}|${p.technicianId}`) ?? []), p])
  expect(plan.days).toHaveLength(stops.size)
  for (const d of plan.days) {
    const list = stops.get(`${d.day}|${d.technicianId}`)!.sort((a, b) => a.order - b.order)
    const legs = routeLegs(techs.get(d.technicianId)!.home, list.map(p => ({ id: p.visitId, lat: visits.get(p.visitId)!.lat, lon: visits.get(p.visitId)!.lon })), { speedKmh: input.speedKmh, detourFactor: input.detourFactor })
    expect(d.km).toBeCloseTo(legs.totalKm, 9)
    expect(d.driveMinutes).toBeCloseTo(legs.totalMinutes, 9)
    expect(d.visitMinutes).toBe(list.reduce((s, p) => s + visits.get(p.visitId)!.durationMinutes, 0))
    if (list.every(p => !visits.get(p.visitId)!.locked)) expect(d.visitMinutes + d.driveMinutes).toBeLessThanOrEqual(d.capacityMinutes + 1e-6)
  }
}

describe('planner properties (fast-check)', () => {
  it('no day over capacity (driving included); every placed visit in its window on a working, open day of its technician; every visit placed or explained, once', () => {
    fc.assert(fc.property(company(false), (input) => {
      const plan = planSeason(input)
      checkPlan(input, plan)
      expect(plan.stats.daysOverCapacity).toBe(0)
    }), { numRuns: 300 })
  })

  it('locked visits stay where a person put them, and the rest still hold', () => {
    fc.assert(fc.property(company(true), (input) => {
      checkPlan(input, planSeason(input))
    }), { numRuns: 200 })
  })

  it('the same input gives the same plan', () => {
    fc.assert(fc.property(company(true), (input) => {
      expect(planSeason(structuredClone(input))).toEqual(planSeason(input))
    }), { numRuns: 100 })
  })

  it('the baseline keeps the same rules', () => {
    fc.assert(fc.property(company(true), (input) => {
      checkPlan(input, planSeasonBaseline(input))
    }), { numRuns: 150 })
  })

  it('re-planning a range moves only visits in it (or unplaced), into it, and changes nothing', () => {
    fc.assert(fc.property(company(true), dayIndex, dayIndex, (input, a, b) => {
      const from = DAYS[Math.min(a, b)]!
      const to = DAYS[Math.max(a, b)]!
      const plan = planSeason(input)
      const current = plan.placed.map(({ visitId, day, technicianId }) => ({ visitId, day, technicianId }))
      const before = JSON.stringify({ input, current })
      const preview = replanDateRange(input, current, { from, to })
      expect(JSON.stringify({ input, current })).toBe(before)
      const locked = new Set(input.visits.filter(v => v.locked).map(v => v.id))
      for (const m of preview.moves) {
        expect(locked.has(m.visitId)).toBe(false)
        if (m.from) expect(m.from.day >= from && m.from.day <= to).toBe(true)
        if (m.to) expect(m.to.day >= from && m.to.day <= to).toBe(true)
        else expect(m.reason).toBeTruthy()
      }
      // Where a visit moves to is a day its technician works, inside its window.
      const visits = new Map(input.visits.map(v => [v.id, v]))
      const techs = new Map(input.technicians.map(t => [t.id, t]))
      for (const m of preview.moves.filter(x => x.to)) {
        const v = visits.get(m.visitId)!
        const t = techs.get(m.to!.technicianId)!
        expect(m.to!.day >= v.windowEarliest && m.to!.day <= v.windowLatest).toBe(true)
        expect(t.workingDays).toContain(isoWeekday(m.to!.day))
        expect([...(input.closedDays ?? []), ...(t.daysOff ?? [])]).not.toContain(m.to!.day)
      }
    }), { numRuns: 100 })
  })
})

/** Steps a planner generator by hand: every progress it yields, and what it returns. */
function stepAll<T>(steps: PlannerSteps<T>): { progress: PlannerProgress[], result: T } {
  const progress: PlannerProgress[] = []
  for (;;) {
    const r = steps.next()
    if (r.done) return { progress, result: r.value }
    progress.push(r.value)
  }
}

function expectProgressRises(progress: PlannerProgress[], total: number) {
  expect(progress.length).toBeGreaterThan(0)
  for (const p of progress) expect(p.total).toBe(total)
  for (let i = 1; i < progress.length; i++) expect(progress[i]!.done).toBeGreaterThanOrEqual(progress[i - 1]!.done)
  expect(progress[0]!.done).toBe(0)
  expect(progress.at(-1)!.done).toBe(total)
  // A step at least every PLANNER_STEP_VISITS visits while placing.
  const placing = progress.filter(p => p.stage === 'planning').map(p => p.done)
  for (let i = 1; i < placing.length; i++) expect(placing[i]! - placing[i - 1]!).toBeLessThanOrEqual(PLANNER_STEP_VISITS)
}

describe('the planner in steps (fast-check)', () => {
  it('stepping planSeasonSteps by hand gives the same plan as planSeason; progress rises and ends at the number of visits to plan', () => {
    // Up to 700 visits, so most runs take several steps of PLANNER_STEP_VISITS.
    fc.assert(fc.property(company(true, 700), (input) => {
      const { progress, result } = stepAll(planSeasonSteps(input))
      expect(result).toEqual(planSeason(input))
      expectProgressRises(progress, input.visits.filter(v => !v.locked).length)
    }), { numRuns: 25 })
  })

  it('stepping replanDateRangeSteps gives the same preview as replanDateRange', () => {
    fc.assert(fc.property(company(true, 400), dayIndex, dayIndex, (input, a, b) => {
      const range = { from: DAYS[Math.min(a, b)]!, to: DAYS[Math.max(a, b)]! }
      const current = planSeason(input).placed.map(({ visitId, day, technicianId }) => ({ visitId, day, technicianId }))
      const { progress, result } = stepAll(replanDateRangeSteps(input, current, range))
      expect(result).toEqual(replanDateRange(input, current, range))
      expect(progress.length).toBeGreaterThan(0)
      expect(progress.at(-1)!.done).toBe(progress.at(-1)!.total)
    }), { numRuns: 20 })
  })

  it('a season of 1,000 visits reports its progress in steps of PLANNER_STEP_VISITS', () => {
    const input: PlannerInput = {
      technicians: [{ id: 't0', capacityMinutes: 480, workingDays: [1, 2, 3, 4, 5], home: { lat: 45, lon: -93 } }],
      visits: Array.from({ length: 1000 }, (_, i) => ({
        id: `v${i}`, windowEarliest: DAYS[0]!, windowLatest: DAYS[20]!, durationMinutes: 30, siteId: `s${i}`, customerId: `c${i % 50}`,
        lat: 45 + (i % 10) * 0.002, lon: -93 + (i % 7) * 0.002,
      })),
    }
    const { progress, result } = stepAll(planSeasonSteps(input))
    expect(result).toEqual(planSeason(input))
    expectProgressRises(progress, 1000)
    expect(progress.filter(p => p.stage === 'planning').map(p => p.done)).toEqual([0, 250, 500, 750, 1000])
  })
})
