// "Plan these weeks again": what would move if the visits placed in a date range (and those still
// unplaced whose window reaches into it) were planned again. Nothing is applied: the caller gets
// the diff and decides.
import { isLocalDate } from '../recurrence'
import type { LocalDate } from '../company-time'
import { planSeasonKeepingSteps } from './plan-season'
import { runPlannerSteps, type PlannerSteps } from './steps'
import { PlannerInputError, type PlannerInput, type PlannerMove, type PlannerVisit, type ReplanPreview } from './types'

export interface CurrentPlacement {
  visitId: string
  day: LocalDate
  technicianId: string
}

/**
 * Re-plans the range [from, to] (both included). Visits placed outside it stay where they are
 * (they count as locked); locked visits never move; visits placed inside it, and unplaced visits
 * whose window reaches into it, are planned again within the range (their windows clipped to it).
 * A visit placed inside the range but outside its own window stays put. Unplaced visits whose
 * window misses the range are left out. Customers keep the technician who has most of their
 * current visits unless `input.previousAssignments` says otherwise, and a visit stays on its
 * current day when that is about as good (PLANNER_WEIGHTS.stayKm). Inputs are not changed.
 */
export function replanDateRange(input: PlannerInput, current: readonly CurrentPlacement[], range: { from: LocalDate, to: LocalDate }): ReplanPreview {
  return runPlannerSteps(replanDateRangeSteps(input, current, range))
}

/** replanDateRange one step at a time: yields the planner's progress, returns the preview. */
export function* replanDateRangeSteps(input: PlannerInput, current: readonly CurrentPlacement[], range: { from: LocalDate, to: LocalDate }): PlannerSteps<ReplanPreview> {
  if (!range || typeof range.from !== 'string' || !isLocalDate(range.from)) throw new PlannerInputError('range.from', 'must be a date as YYYY-MM-DD')
  if (typeof range.to !== 'string' || !isLocalDate(range.to)) throw new PlannerInputError('range.to', 'must be a date as YYYY-MM-DD')
  if (range.to < range.from) throw new PlannerInputError('range.to', 'the range ends before it starts')
  if (!Array.isArray(input?.visits)) throw new PlannerInputError('visits', 'must be a list')
  const known = new Set(input.visits.map(v => v.id))
  const now = new Map<string, CurrentPlacement>()
  current.forEach((c, i) => {
    if (!known.has(c?.visitId)) throw new PlannerInputError(`current[${i}].visitId`, `no visit "${String(c?.visitId)}" in visits`)
    if (now.has(c.visitId)) throw new PlannerInputError(`current[${i}].visitId`, `"${c.visitId}" is placed twice`)
    if (typeof c.day !== 'string' || !isLocalDate(c.day)) throw new PlannerInputError(`current[${i}].day`, 'must be a date as YYYY-MM-DD')
    now.set(c.visitId, c)
  })

  // Who has most of each customer's current visits (ties: the technician listed first).
  const techOrder = new Map(input.technicians.map((t, i) => [t.id, i]))
  const counts = new Map<string, Map<string, number>>()
  for (const v of input.visits) {
    const c = now.get(v.id)
    if (!c) continue
    const m = counts.get(v.customerId) ?? new Map<string, number>()
    m.set(c.technicianId, (m.get(c.technicianId) ?? 0) + 1)
    counts.set(v.customerId, m)
  }
  const previous: Record<string, string> = {}
  for (const [customer, m] of counts) {
    const [top] = [...m].sort((a, b) => b[1] - a[1] || (techOrder.get(a[0]) ?? 1e9) - (techOrder.get(b[0]) ?? 1e9))
    if (top) previous[customer] = top[0]
  }

  const replanned = new Set<string>()
  const visits: PlannerVisit[] = []
  for (const v of input.visits) {
    const c = now.get(v.id)
    if (v.locked) {
      visits.push(v)
      continue
    }
    const inRange = c ? c.day >= range.from && c.day <= range.to : true
    const earliest = v.windowEarliest > range.from ? v.windowEarliest : range.from
    const latest = v.windowLatest < range.to ? v.windowLatest : range.to
    const outsideOwnWindow = c ? c.day < v.windowEarliest || c.day > v.windowLatest : false
    if (c && (!inRange || outsideOwnWindow || earliest > latest)) {
      visits.push({ ...v, locked: { day: c.day, technicianId: c.technicianId } })
      continue
    }
    if (!c && earliest > latest) continue
    const preferred = v.preferred === undefined ? undefined : v.preferred < earliest ? earliest : v.preferred > latest ? latest : v.preferred
    visits.push({ ...v, windowEarliest: earliest, windowLatest: latest, preferred })
    replanned.add(v.id)
  }

  const keep = new Map([...now].filter(([id]) => replanned.has(id)).map(([id, c]) => [id, { day: c.day, technicianId: c.technicianId }]))
  const plan = yield* planSeasonKeepingSteps({ ...input, visits, previousAssignments: { ...previous, ...input.previousAssignments } }, keep)
  const placedNow = new Map(plan.placed.map(p => [p.visitId, p]))
  const why = new Map(plan.unplaced.map(u => [u.visitId, u.reason]))
  const moves: PlannerMove[] = []
  for (const v of visits) {
    if (!replanned.has(v.id)) continue
    const before = now.get(v.id)
    const after = placedNow.get(v.id)
    if (before && after && before.day === after.day && before.technicianId === after.technicianId) continue
    if (!before && !after) continue
    moves.push({
      visitId: v.id,
      from: before ? { day: before.day, technicianId: before.technicianId } : null,
      to: after ? { day: after.day, technicianId: after.technicianId } : null,
      ...(after ? {} : { reason: why.get(v.id) }),
    })
  }
  return { moves, plan }
}
