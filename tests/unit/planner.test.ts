import { describe, expect, it } from 'vitest'
import {
  planSeason, planSeasonBaseline, PlannerInputError, replanDateRange,
  type PlannerInput, type PlannerTechnician, type PlannerVisit, type SeasonPlan,
} from '../../shared/utils/planner/index'

// Fixed dates only (the week of Monday 5 April 2027); nothing depends on today's date.
// Positions are invented: a town near (45.00, -93.00); 0.01° of latitude is about 1.1 km.
const MON = '2027-04-05'
const FRI = '2027-04-09'
const WEEKDAYS = [1, 2, 3, 4, 5]
const TOWN = { lat: 45.0, lon: -93.0 }

function tech(id: string, over: Partial<PlannerTechnician> = {}): PlannerTechnician {
  return { id, name: id[0]!.toUpperCase() + id.slice(1), capacityMinutes: 420, workingDays: WEEKDAYS, home: TOWN, ...over }
}
function visit(id: string, over: Partial<PlannerVisit> = {}): PlannerVisit {
  const n = Number(id.replace(/\D/g, '')) || 0
  return { id, windowEarliest: MON, windowLatest: FRI, durationMinutes: 45, siteId: `site-${id}`, customerId: `cust-${id}`,
    lat: TOWN.lat + (n % 5) * 0.004, lon: TOWN.lon + (n % 7) * 0.004, ...over }
}
const byVisit = (plan: SeasonPlan) => new Map(plan.placed.map(p => [p.visitId, p]))

function expectEveryVisitOnce(input: PlannerInput, plan: SeasonPlan) {
  const seen = [...plan.placed.map(p => p.visitId), ...plan.unplaced.map(u => u.visitId)].sort()
  expect(seen).toEqual(input.visits.map(v => v.id).sort())
}
function expectWithinCapacity(plan: SeasonPlan) {
  for (const d of plan.days) expect(d.visitMinutes + d.driveMinutes).toBeLessThanOrEqual(d.capacityMinutes + 1e-6)
  expect(plan.stats.daysOverCapacity).toBe(0)
}

describe('planner: enough capacity', () => {
  const input: PlannerInput = { visits: Array.from({ length: 24 }, (_, i) => visit(`v${i}`)), technicians: [tech('tess'), tech('dario', { capacityMinutes: 450 })] }

  it('places everything with no day over capacity, driving included', () => {
    const plan = planSeason(input)
    expect(plan.unplaced).toEqual([])
    expect(plan.placed).toHaveLength(24)
    expectEveryVisitOnce(input, plan)
    expectWithinCapacity(plan)
    // 24 × 45 min = 1,080 min of visits, all counted in the days.
    expect(plan.days.reduce((s, d) => s + d.visitMinutes, 0)).toBe(1080)
    expect(plan.stats.totalKm).toBeGreaterThan(0)
  })

  it('numbers each day\'s stops 1 … n in driving order', () => {
    const plan = planSeason(input)
    const groups = new Map<string, number[]>()
    for (const p of plan.placed) groups.set(`${p.day} ${p.technicianId}`, [...(groups.get(`${p.day} ${p.technicianId}`) ?? []), p.order])
    for (const [key, orders] of groups) {
      expect(orders.sort((a, b) => a - b)).toEqual(orders.map((_, i) => i + 1))
      expect(plan.days.find(d => `${d.day} ${d.technicianId}` === key)!.visits).toBe(orders.length)
    }
  })

  it('the same input gives the same plan, and the input is not changed', () => {
    const before = JSON.stringify(input)
    const a = planSeason(input)
    expect(planSeason(JSON.parse(before))).toEqual(a)
    expect(JSON.stringify(input)).toBe(before)
  })
})

describe('planner: one technician, more work than days', () => {
  // Tess has 250 minutes a day; visits of 120 minutes a few hundred metres from her home:
  // two fit a day (240 min + a few minutes' driving), so five days hold 10 of the 12.
  const input: PlannerInput = {
    visits: Array.from({ length: 12 }, (_, i) => visit(`v${i}`, { durationMinutes: 120 })),
    technicians: [tech('tess', { capacityMinutes: 250 })],
  }

  it('lists the overflow with the window and whose days were full', () => {
    const plan = planSeason(input)
    expect(plan.placed).toHaveLength(10)
    expect(plan.unplaced).toHaveLength(2)
    expectEveryVisitOnce(input, plan)
    expectWithinCapacity(plan)
    for (const u of plan.unplaced) {
      expect(u.code).toBe('days-full')
      expect(u.reason).toBe('No room between 5 Apr and 9 Apr: every working day of Tess is full (none has 120 minutes free with the driving)')
    }
    expect(plan.stats.unplacedByCode).toEqual({ 'no-working-day': 0, 'days-full': 2, 'too-long': 0 })
    expect(new Set(plan.days.map(d => d.day))).toEqual(new Set(['2027-04-05', '2027-04-06', '2027-04-07', '2027-04-08', '2027-04-09']))
  })

  it('writes dates month first when asked', () => {
    expect(planSeason({ ...input, dateOrder: 'month-day' }).unplaced[0]!.reason).toMatch(/^No room between Apr 5 and Apr 9: every working day of Tess is full/)
  })

  it('makes room for a long visit by moving a short one to another day of its window', () => {
    // One customer, Tess works Monday to Wednesday, 100 minutes a day. The short visits take one
    // day each first; the 90-minute visit then fits nowhere until the Monday-or-Tuesday one moves to Tuesday.
    const one = { customerId: 'cust-1' }
    const plan = planSeason({
      visits: [
        visit('x1', { ...one, durationMinutes: 30, windowEarliest: MON, windowLatest: '2027-04-06' }),
        visit('x2', { ...one, durationMinutes: 30, windowEarliest: '2027-04-06', windowLatest: '2027-04-06' }),
        visit('x3', { ...one, durationMinutes: 30, windowEarliest: '2027-04-07', windowLatest: '2027-04-07' }),
        visit('y', { ...one, durationMinutes: 90, windowEarliest: MON, windowLatest: '2027-04-07' }),
      ],
      technicians: [tech('tess', { capacityMinutes: 100, workingDays: [1, 2, 3] })],
    })
    expect(plan.unplaced).toEqual([])
    expect(Object.fromEntries(plan.placed.map(p => [p.visitId, p.day]))).toEqual({ y: MON, x1: '2027-04-06', x2: '2027-04-06', x3: '2027-04-07' })
    expectWithinCapacity(plan)
  })

  it('a visit longer than any working day is listed as too long', () => {
    const plan = planSeason({ visits: [visit('v1', { durationMinutes: 500 })], technicians: [tech('tess', { capacityMinutes: 480 })] })
    expect(plan.unplaced).toEqual([{ visitId: 'v1', code: 'too-long', reason: 'It takes 500 minutes plus the drive there, more than a whole working day between 5 Apr and 9 Apr (the longest is 480 minutes)' }])
  })
})

describe('planner: areas', () => {
  // Two towns about 55 km apart, twelve customers in each; both technicians start from the same yard between them.
  const east = { lat: 45.0, lon: -92.65 }
  const west = { lat: 45.0, lon: -93.35 }
  const visits = Array.from({ length: 24 }, (_, i) => {
    const town = i % 2 === 0 ? east : west
    return visit(`v${i}`, { lat: town.lat + (i % 3) * 0.003, lon: town.lon + (i % 4) * 0.003, customerId: `cust-${i}` })
  })
  const yard = { lat: 45.0, lon: -93.0 }
  const input: PlannerInput = { visits, technicians: [tech('tess', { home: yard }), tech('dario', { home: yard })] }
  const townOf = (id: string) => (Number(id.slice(1)) % 2 === 0 ? 'east' : 'west')

  it('each technician\'s days stay in one town, and the two towns go to different technicians', () => {
    const plan = planSeason(input)
    expect(plan.unplaced).toEqual([])
    const towns = new Map<string, Set<string>>()
    for (const p of plan.placed) towns.set(p.technicianId, (towns.get(p.technicianId) ?? new Set()).add(townOf(p.visitId)))
    expect([...towns.values()].map(s => s.size)).toEqual([1, 1])
    expect(new Set([...towns.values()].map(s => [...s][0]))).toEqual(new Set(['east', 'west']))
  })

  it('with homes in the towns, each technician serves the town they live in', () => {
    const plan = planSeason({ ...input, technicians: [tech('tess', { home: west }), tech('dario', { home: east })] })
    for (const p of plan.placed) expect(p.technicianId).toBe(townOf(p.visitId) === 'west' ? 'tess' : 'dario')
  })

  it('drives less than the baseline (first day of the window, nearest technician with room)', () => {
    const plan = planSeason(input)
    const base = planSeasonBaseline(input)
    expect(base.unplaced).toEqual([])
    expectWithinCapacity(base)
    expect(plan.stats.totalKm).toBeLessThan(base.stats.totalKm)
    // The baseline fills Tess's Monday first, with both towns on it.
    expect(new Set(base.placed.filter(p => p.day === MON && p.technicianId === 'tess').map(p => townOf(p.visitId)))).toEqual(new Set(['east', 'west']))
  })

  it('keeps a customer with the technician who served them before', () => {
    const plan = planSeason({ ...input, technicians: [tech('tess', { home: west }), tech('dario', { home: east })], previousAssignments: { 'cust-0': 'tess', 'cust-2': 'tess' } })
    const at = byVisit(plan)
    expect(at.get('v0')!.technicianId).toBe('tess')
    expect(at.get('v2')!.technicianId).toBe('tess')
    expect(at.get('v4')!.technicianId).toBe('dario')
  })

  it('keeps every visit of a customer with one technician', () => {
    const season: PlannerInput = {
      visits: Array.from({ length: 30 }, (_, i) => visit(`v${i}`, { customerId: `cust-${i % 6}`, windowEarliest: `2027-04-${String(5 + (i % 5)).padStart(2, '0')}`, windowLatest: `2027-04-${String(5 + (i % 5)).padStart(2, '0')}`, lat: TOWN.lat + (i % 6) * 0.01 })),
      technicians: [tech('tess'), tech('dario')],
    }
    const plan = planSeason(season)
    expect(plan.unplaced).toEqual([])
    expect(plan.stats.customersWithOneTechnician).toBe(1)
  })
})

describe('planner: what holds', () => {
  it('windows, working days, days off and closed days', () => {
    // Tess works Tuesday to Thursday; Wednesday 7 April is a closed day; she is off on Thursday 8 April.
    const input: PlannerInput = {
      visits: [...Array.from({ length: 4 }, (_, i) => visit(`v${i}`)), visit('v9', { windowEarliest: '2027-04-07', windowLatest: '2027-04-08' })],
      technicians: [tech('tess', { workingDays: [2, 3, 4], daysOff: ['2027-04-08'] })],
      closedDays: ['2027-04-07'],
    }
    const plan = planSeason(input)
    expect(plan.placed.map(p => p.day)).toEqual(['2027-04-06', '2027-04-06', '2027-04-06', '2027-04-06'])
    expect(plan.unplaced).toEqual([{ visitId: 'v9', code: 'no-working-day', reason: 'No working day between 7 Apr and 8 Apr: weekends, closed days and days off cover the whole window' }])
  })

  it('with no technician at all, says so', () => {
    expect(planSeason({ visits: [visit('v1')], technicians: [] }).unplaced).toEqual([{ visitId: 'v1', code: 'no-working-day', reason: 'No technician to plan with between 5 Apr and 9 Apr' }])
  })

  it('a one-day window is kept to that day', () => {
    const plan = planSeason({ visits: [visit('v1', { windowEarliest: '2027-04-08', windowLatest: '2027-04-08' })], technicians: [tech('tess')] })
    expect(plan.placed).toEqual([{ visitId: 'v1', day: '2027-04-08', technicianId: 'tess', order: 1 }])
  })

  it('locked visits never move and count against capacity', () => {
    const input: PlannerInput = {
      visits: [
        // Put by hand on a Saturday, on Dario, and outside its window: it stays.
        visit('v1', { locked: { day: '2027-04-10', technicianId: 'dario' } }),
        // 400 of Tess's 420 minutes on Monday.
        visit('v2', { durationMinutes: 400, locked: { day: MON, technicianId: 'tess' } }),
        ...Array.from({ length: 6 }, (_, i) => visit(`v${i + 3}`, { windowEarliest: MON, windowLatest: MON })),
      ],
      technicians: [tech('tess'), tech('dario')],
    }
    const plan = planSeason(input)
    const at = byVisit(plan)
    expect(at.get('v1')).toMatchObject({ day: '2027-04-10', technicianId: 'dario' })
    expect(at.get('v2')).toMatchObject({ day: MON, technicianId: 'tess' })
    expect(plan.stats.locked).toBe(2)
    // Nothing else fits beside the 400-minute visit: the Monday-only visits all go to Dario.
    for (let i = 3; i <= 8; i++) expect(at.get(`v${i}`)).toMatchObject({ day: MON, technicianId: 'dario' })
    expectWithinCapacity(plan)
  })
})

describe('planner: plan these weeks again', () => {
  const technicians = [tech('tess', { capacityMinutes: 240 }), tech('dario', { capacityMinutes: 240 })]
  const visits = [
    ...Array.from({ length: 8 }, (_, i) => visit(`v${i}`, { durationMinutes: 60 })),
    // Next week: placed there, outside the range, so it stays.
    visit('v20', { windowEarliest: '2027-04-12', windowLatest: '2027-04-16' }),
    // Unplaced, due in the range: it is planned.
    visit('v21', { durationMinutes: 30 }),
  ]
  const input: PlannerInput = { visits, technicians }
  // Today's schedule, set by hand: all eight on Tess's Monday (480 min in a 240-min day).
  const current = [...Array.from({ length: 8 }, (_, i) => ({ visitId: `v${i}`, day: MON, technicianId: 'tess' })), { visitId: 'v20', day: '2027-04-13', technicianId: 'dario' }]

  it('returns what would move, inside the range, and changes nothing', () => {
    const before = JSON.stringify({ input, current })
    const preview = replanDateRange(input, current, { from: MON, to: FRI })
    expect(JSON.stringify({ input, current })).toBe(before)
    expect(preview.moves.length).toBeGreaterThan(0)
    expect(preview.moves.find(m => m.visitId === 'v20')).toBeUndefined()
    expect(preview.moves.find(m => m.visitId === 'v21')).toMatchObject({ from: null })
    for (const m of preview.moves) {
      expect(m.to).not.toBeNull()
      expect(m.to!.day >= MON && m.to!.day <= FRI).toBe(true)
    }
    // After the moves no day is over capacity, and v20 is still where it was.
    expectWithinCapacity(preview.plan)
    expect(byVisit(preview.plan).get('v20')).toMatchObject({ day: '2027-04-13', technicianId: 'dario' })
  })

  it('a plan re-planned as it is moves nothing', () => {
    const plan = planSeason(input)
    expect(replanDateRange(input, plan.placed, { from: MON, to: FRI }).moves).toEqual([])
  })

  it('a visit that no longer fits says why', () => {
    const tight: PlannerInput = { visits: [visit('a', { durationMinutes: 200 }), visit('b', { durationMinutes: 200 })], technicians: [tech('tess', { capacityMinutes: 240, workingDays: [1] })] }
    const preview = replanDateRange(tight, [{ visitId: 'a', day: MON, technicianId: 'tess' }, { visitId: 'b', day: MON, technicianId: 'tess' }], { from: MON, to: FRI })
    expect(preview.moves).toHaveLength(1)
    expect(preview.moves[0]).toMatchObject({ to: null, reason: expect.stringMatching(/^No room between 5 Apr and 9 Apr/) })
  })

  it('refuses a range that ends before it starts', () => {
    expect(() => replanDateRange(input, current, { from: FRI, to: MON })).toThrow(PlannerInputError)
  })
})

describe('planner: bad input names the field', () => {
  const ok = { visits: [visit('v1')], technicians: [tech('tess')] }
  it.each([
    ['visits[1].id', { ...ok, visits: [visit('v1'), visit('v1')] }],
    ['visits[0].windowLatest', { ...ok, visits: [visit('v1', { windowEarliest: FRI, windowLatest: MON })] }],
    ['visits[0].windowEarliest', { ...ok, visits: [visit('v1', { windowEarliest: '2027-02-30' })] }],
    ['visits[0].preferred', { ...ok, visits: [visit('v1', { preferred: '2027-05-01' })] }],
    ['visits[0].durationMinutes', { ...ok, visits: [visit('v1', { durationMinutes: 0 })] }],
    ['visits[0].lat', { ...ok, visits: [visit('v1', { lat: 91 })] }],
    ['visits[0].locked.technicianId', { ...ok, visits: [visit('v1', { locked: { day: MON, technicianId: 'nobody' } })] }],
    ['technicians[0].workingDays', { ...ok, technicians: [tech('tess', { workingDays: [0] })] }],
    ['technicians[1].id', { ...ok, technicians: [tech('tess'), tech('tess')] }],
    ['technicians[0].capacityMinutes', { ...ok, technicians: [tech('tess', { capacityMinutes: -1 })] }],
    ['closedDays[0]', { ...ok, closedDays: ['5 April'] }],
    ['speedKmh', { ...ok, speedKmh: 0 }],
    ['detourFactor', { ...ok, detourFactor: 0.5 }],
  ])('%s', (field, input) => {
    expect(() => planSeason(input as PlannerInput)).toThrow(expect.objectContaining({ name: 'PlannerInputError', field }))
  })
})

describe('planner: onlyPlannedDays (a batch of new visits next to a booked season)', () => {
  // Tess's week is booked on Monday to Wednesday; five new visits fit only on Thursday and Friday.
  const booked = ['2027-04-05', '2027-04-06', '2027-04-07'].flatMap((day, d) =>
    Array.from({ length: 3 }, (_, k) => visit(`b${d * 3 + k}`, { windowEarliest: day, windowLatest: day, durationMinutes: 120, locked: { day, technicianId: 'tess' } })))
  const fresh = Array.from({ length: 5 }, (_, i) => visit(`n${i}`, { windowEarliest: '2027-04-08', windowLatest: FRI }))
  const input: PlannerInput = { visits: [...booked, ...fresh], technicians: [tech('tess')] }

  it('places the new visits exactly as the full answer does, and answers only for the days it placed on', () => {
    const full = planSeason(input)
    const only = planSeason({ ...input, onlyPlannedDays: true })
    const placedNew = (plan: SeasonPlan) => plan.placed.filter(p => p.visitId.startsWith('n')).map(p => `${p.visitId} ${p.day} ${p.technicianId}`).sort()
    expect(placedNew(only)).toEqual(placedNew(full))
    expect(placedNew(only)).toHaveLength(5)
    expect(only.unplaced).toEqual(full.unplaced)
    // The booked-only days (Monday to Wednesday) are left out; the full answer has them.
    expect(full.days.map(d => d.day)).toEqual(expect.arrayContaining(['2027-04-05', '2027-04-06', '2027-04-07']))
    expect(only.days.every(d => d.day >= '2027-04-08')).toBe(true)
    expect(only.placed.some(p => p.visitId.startsWith('b'))).toBe(false)
  })
})
