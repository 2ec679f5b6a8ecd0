// The season planner: a day and a technician for each visit.
//
// 1. Locked visits stay where a person put them and count against capacity.
// 2. Territories: customers go to technicians by area (grid cells joined by a capacity-limited
//    k-means starting from the technicians' homes); a customer served before keeps that
//    technician; whole territories are then swapped between technicians while that brings both
//    nearer home. Every visit of a customer goes to the territory's technician while there is room.
// 3. Within a territory each customer gets a weekday (a second capacity-limited k-means, one
//    group per working weekday), so each weekday's stops lie in one part of the territory.
// 4. Visits are placed most constrained first (shortest window, then earliest), each on the day of
//    its window with the lowest cost: extra driving by cheapest insertion into that day's route,
//    plus a penalty off the customer's weekday and per day away from the preferred day — on a day
//    the technician works, with room for the visit and all the driving (capacity is never
//    exceeded). When the territory's technician has no room, the other technicians are tried.
// 5. Repair: a visit that found no place gets room by moving one other visit of a full day to
//    another day of that visit's own window (bounded work).
// 6. Each day's route is checked with route-order.ts; what found no place is listed with the reason.
// Deterministic: no randomness, every tie goes to the earlier index.
import { greatCircleKm, type RouteCoordinate } from '../route-order'
import { balancedGroups, gridCells, spreadCentres, type AreaItem } from './areas'
import type { Insertion } from './day-route'
import { PlanBook } from './plan-book'
import { plannerDayNumber, plannerWeekday, preparePlannerInput, type PreparedInput } from './prepare'
import { PLANNER_STEP_VISITS, runPlannerSteps, type PlannerSteps } from './steps'
import type { PlannerInput, SeasonPlan } from './types'

/** Cost weights, in road km of extra driving (tuning values, no source). */
export const PLANNER_WEIGHTS = Object.freeze({
  /** A visit on another weekday than its customer's: worth this much extra driving to avoid. */
  offWeekdayKm: 40,
  /** Each day away from the preferred day. */
  perDayFromPreferredKm: 0.5,
  /** Another technician than the one who took this customer's earlier overflow. */
  otherTechnicianKm: 5,
  /** Re-planning: the day and technician a visit has now, worth this much driving to keep (more than offWeekdayKm). */
  stayKm: 60,
  /** Repair: stops looked at in all, at most (keeps an overloaded season fast). */
  repairBudget: 3_000_000,
  /** Repair: technicians tried besides the territory's. */
  repairTechnicians: 3,
  /** Grid cell size for grouping sites into areas. */
  areaCellKm: 2,
})

interface Territories {
  techOfCustomer: Int32Array
  weekdayOfCustomer: Int32Array
  centres: RouteCoordinate[]
}

function customerItems(P: PreparedInput): AreaItem[] {
  const items = P.customers.map(() => ({ lat: 0, lon: 0, weight: 0, n: 0 }))
  P.visits.forEach((v, i) => {
    const it = items[P.customerOf[i]!]!
    it.lat += v.lat
    it.lon += v.lon
    it.n++
    if (P.lockedTech[i]! < 0) it.weight += P.duration[i]!
  })
  return items.map(it => ({ lat: it.lat / it.n, lon: it.lon / it.n, weight: it.weight }))
}

/** The busiest week's visit minutes (by preferred day) over that week's technician minutes. */
function peakUtilisation(P: PreparedInput): number {
  const weeks = Math.ceil(P.nDays / 7)
  const load = new Float64Array(weeks)
  const room = new Float64Array(weeks)
  for (let v = 0; v < P.visits.length; v++) if (P.lockedTech[v]! < 0) load[Math.floor(P.preferred[v]! / 7)]! += P.duration[v]!
  P.techs.forEach((t, i) => {
    const a = P.available[i]!
    for (let d = 0; d < P.nDays; d++) if (a[d]) room[Math.floor(d / 7)]! += t.capacityMinutes
  })
  let peak = 0
  for (let w = 0; w < weeks; w++) if (load[w]! > 0) peak = Math.max(peak, room[w]! > 0 ? load[w]! / room[w]! : Infinity)
  return Number.isFinite(peak) ? peak : 0
}

/**
 * Swaps whole territories between two technicians while that brings both closer to home and each
 * territory fits its new technician's limit (customers pinned to a technician stay with them).
 */
function matchTerritoriesToHomes(P: PreparedInput, areas: readonly AreaItem[], group: Int32Array, limits: readonly number[], baseLoad: readonly number[]): void {
  const T = P.techs.length
  if (T < 2 || areas.length === 0) return
  const load = new Array<number>(T).fill(0)
  const lat = new Array<number>(T).fill(0)
  const lon = new Array<number>(T).fill(0)
  areas.forEach((a, i) => {
    const g = group[i]!
    load[g]! += a.weight
    lat[g]! += a.lat * a.weight
    lon[g]! += a.lon * a.weight
  })
  const centre = (g: number) => (load[g]! > 0 ? { lat: lat[g]! / load[g]!, lon: lon[g]! / load[g]! } : null)
  // cost[g][t]: home of t to the centre of territory g, weighted by the territory's load.
  const cost = (g: number, t: number) => {
    const c = centre(g)
    return c ? greatCircleKm(P.techs[t]!.home, c) * load[g]! : 0
  }
  const owner = Array.from({ length: T }, (_, g) => g) // territory g is served by technician owner[g]
  let improved = true
  for (let pass = 0; improved && pass < 10; pass++) {
    improved = false
    for (let g = 0; g < T; g++) {
      for (let h = g + 1; h < T; h++) {
        const a = owner[g]!
        const b = owner[h]!
        if (load[g]! + baseLoad[b]! > limits[b]! + 1e-9 || load[h]! + baseLoad[a]! > limits[a]! + 1e-9) continue
        if (cost(g, b) + cost(h, a) < cost(g, a) + cost(h, b) - 1e-9) {
          owner[g] = b
          owner[h] = a
          improved = true
        }
      }
    }
  }
  for (let i = 0; i < group.length; i++) group[i] = owner[group[i]!]!
}

/** Customer → technician: who served them before, else whose locked visits they have most, else by area. */
function territories(P: PreparedInput, customers: AreaItem[]): Territories {
  const T = P.techs.length
  const techOfCustomer = new Int32Array(customers.length).fill(-1)
  const lockedCount = new Map<number, Map<number, number>>()
  for (let v = 0; v < P.visits.length; v++) {
    if (P.lockedTech[v]! < 0) continue
    const c = P.customerOf[v]!
    const m = lockedCount.get(c) ?? new Map<number, number>()
    m.set(P.lockedTech[v]!, (m.get(P.lockedTech[v]!) ?? 0) + 1)
    lockedCount.set(c, m)
  }
  const baseLoad = new Array<number>(T).fill(0)
  customers.forEach((c, i) => {
    let t = P.previous[i]!
    if (t < 0 && lockedCount.has(i)) {
      let best = -1
      for (const [tech, n] of [...lockedCount.get(i)!].sort((a, b) => a[0] - b[0])) if (best < 0 || n > lockedCount.get(i)!.get(best)!) best = tech
      t = best
    }
    if (t >= 0) {
      techOfCustomer[i] = t
      baseLoad[t]! += c.weight
    }
  })

  const free = customers.map((_, i) => i).filter(i => techOfCustomer[i]! < 0)
  const cells = gridCells(free.map(i => customers[i]!), PLANNER_WEIGHTS.areaCellKm)
  const areas: AreaItem[] = []
  const cellItems: number[][] = []
  free.forEach((c, k) => {
    const a = cells[k]!
    const it = customers[c]!
    if (!areas[a]) {
      areas[a] = { lat: 0, lon: 0, weight: 0 }
      cellItems[a] = []
    }
    const w = Math.max(it.weight, 1e-6)
    areas[a]!.lat += it.lat * w
    areas[a]!.lon += it.lon * w
    areas[a]!.weight += w
    cellItems[a]!.push(c)
  })
  for (const a of areas) {
    a.lat /= a.weight
    a.lon /= a.weight
  }

  const availMinutes = P.techs.map((t, i) => t.capacityMinutes * P.available[i]!.reduce((s, x) => s + x, 0))
  const totalAvail = availMinutes.reduce((a, b) => a + b, 0) || 1
  const totalLoad = customers.reduce((s, c) => s + c.weight, 0)
  // A fair share of the work, a little over; or, when even the busiest week has room to spare, more
  // (so territories follow geography), keeping a quarter of the busiest week for driving.
  const utilisation = totalLoad / totalAvail
  const peak = peakUtilisation(P)
  const roomy = peak > 0 ? (0.75 * utilisation) / peak : 1
  const limits = availMinutes.map(m => Math.max(totalLoad * (m / totalAvail) * 1.05, m * roomy))
  // Start from the technicians' homes; a home shared with an earlier technician starts from a spread point instead.
  const spread = spreadCentres(areas, T)
  const starts = P.techs.map((t, i) => {
    const shared = P.techs.slice(0, i).some(o => greatCircleKm(o.home, t.home) < 1)
    return shared && spread[i] ? spread[i]! : t.home
  })
  const group = areas.length ? balancedGroups(areas, starts, limits, baseLoad) : new Int32Array(0)
  matchTerritoriesToHomes(P, areas, group, limits, baseLoad)
  cellItems.forEach((members, a) => {
    for (const c of members) techOfCustomer[c] = group[a]!
  })

  // Weekdays within each territory.
  const weekdayOfCustomer = new Int32Array(customers.length)
  const centres: RouteCoordinate[] = P.techs.map(t => t.home)
  for (let t = 0; t < T; t++) {
    const members = customers.map((_, i) => i).filter(i => techOfCustomer[i] === t)
    if (!members.length) continue
    const items = members.map(i => customers[i]!)
    const w = items.reduce((s, it) => s + Math.max(it.weight, 1e-6), 0)
    centres[t] = { lat: items.reduce((s, it) => s + it.lat * Math.max(it.weight, 1e-6), 0) / w, lon: items.reduce((s, it) => s + it.lon * Math.max(it.weight, 1e-6), 0) / w }
    const weekdays = [...new Set(P.techs[t]!.workingDays)].sort((a, b) => a - b)
    if (!weekdays.length) continue
    const load = items.reduce((s, it) => s + it.weight, 0)
    const k = Math.min(weekdays.length, items.length)
    const g = balancedGroups(items, spreadCentres(items, k), new Array(k).fill((load / k) * 1.1))
    members.forEach((c, j) => {
      weekdayOfCustomer[c] = weekdays[g[j]!]!
    })
  }
  return { techOfCustomer, weekdayOfCustomer, centres }
}

/** The best day of v's window with technician t, by cost; null when no day has room. */
interface DayPick { d: number, cost: number, at: Insertion }

function bestDay(P: PreparedInput, book: PlanBook, v: number, t: number, weekday: number, extraKm: number, stayDay = -1, skipDay = -1): DayPick | null {
  let best: DayPick | null = null
  const avail = P.available[t]!
  for (let d = P.earliest[v]!; d <= P.latest[v]!; d++) {
    if (!avail[d] || d === skipDay) continue
    const at = book.fits(v, t, d)
    if (!at) continue
    const cost = at.deltaKm * P.detourFactor + extraKm
      + (weekday && plannerWeekday(P.firstDay + d) !== weekday ? PLANNER_WEIGHTS.offWeekdayKm : 0)
      + Math.abs(d - P.preferred[v]!) * PLANNER_WEIGHTS.perDayFromPreferredKm
      - (d === stayDay ? PLANNER_WEIGHTS.stayKm : 0)
    if (!best || cost < best.cost) best = { d, cost, at }
  }
  return best
}

/**
 * Plans a season (or any span): a day and a technician for every visit that fits, each listed
 * once in `placed` or in `unplaced` with the reason. Pure and deterministic: the same input gives
 * the same plan. Throws PlannerInputError naming the field on unusable input.
 */
export function planSeason(input: PlannerInput): SeasonPlan {
  return runPlannerSteps(planSeasonSteps(input))
}

/**
 * planSeason, preferring to leave visits where they are now (`current`: visit id → day and
 * technician): re-planning a plan that still works moves little. For replanDateRange.
 */
export function planSeasonKeeping(input: PlannerInput, current: ReadonlyMap<string, { day: string, technicianId: string }>): SeasonPlan {
  return runPlannerSteps(planSeasonKeepingSteps(input, current))
}

/** planSeason one step at a time: yields its progress every few hundred visits, returns the plan. */
export function planSeasonSteps(input: PlannerInput): PlannerSteps<SeasonPlan> {
  return planSeasonKeepingSteps(input, new Map())
}

/** planSeasonKeeping one step at a time (see planSeasonSteps). */
export function* planSeasonKeepingSteps(input: PlannerInput, current: ReadonlyMap<string, { day: string, technicianId: string }>): PlannerSteps<SeasonPlan> {
  const P = preparePlannerInput(input)
  const stayTech = new Int32Array(P.visits.length).fill(-1)
  const stayDay = new Int32Array(P.visits.length).fill(-1)
  P.visits.forEach((v, i) => {
    const c = current.get(v.id)
    const t = c ? P.techIndex.get(c.technicianId) : undefined
    if (c && t !== undefined) {
      stayTech[i] = t
      stayDay[i] = plannerDayNumber(c.day) - P.firstDay
    }
  })
  let toPlace = 0
  for (let v = 0; v < P.visits.length; v++) if (P.lockedTech[v]! < 0) toPlace++
  yield { stage: 'planning', done: 0, total: toPlace }
  const book = new PlanBook(P)
  book.placeLocked()
  const customers = customerItems(P)
  const { techOfCustomer, weekdayOfCustomer, centres } = territories(P, customers)
  const spillTech = new Int32Array(customers.length).fill(-1)

  const order: number[] = []
  for (let v = 0; v < P.visits.length; v++) if (P.lockedTech[v]! < 0) order.push(v)
  order.sort((a, b) => (P.latest[a]! - P.earliest[a]!) - (P.latest[b]! - P.earliest[b]!) || P.earliest[a]! - P.earliest[b]! || a - b)

  const T = P.techs.length
  const othersOf = new Map<number, number[]>()
  /** The other technicians for a customer's overflow, nearest territory first. */
  const others = (c: number, home: number) => {
    let list = othersOf.get(c)
    if (!list) {
      list = Array.from({ length: T }, (_, t) => t).filter(t => t !== home)
        .map(t => ({ t, km: greatCircleKm(customers[c]!, centres[t]!) }))
        .sort((a, b) => a.km - b.km || a.t - b.t).map(x => x.t)
      othersOf.set(c, list)
    }
    return list
  }
  /** The best technician-day for v (not `skipTech`'s day `skipDay`), or null. */
  const choose = (v: number, skipTech = -1, skipDay = -1): { t: number, pick: DayPick } | null => {
    const c = P.customerOf[v]!
    const home = techOfCustomer[c]!
    const skipFor = (t: number) => (t === skipTech ? skipDay : -1)
    let pick = home >= 0 ? bestDay(P, book, v, home, weekdayOfCustomer[c]!, 0, stayTech[v] === home ? stayDay[v]! : -1, skipFor(home)) : null
    let pickTech = home
    if (stayTech[v]! >= 0 && stayTech[v] !== home) {
      const stay = bestDay(P, book, v, stayTech[v]!, 0, 0, stayDay[v]!, skipFor(stayTech[v]!))
      if (stay && (!pick || stay.cost < pick.cost)) {
        pick = stay
        pickTech = stayTech[v]!
      }
    }
    if (!pick) {
      // Overflow: the other technicians; the one who took this customer's earlier overflow is preferred.
      for (const t of others(c, home)) {
        const extra = spillTech[c]! >= 0 && spillTech[c] !== t ? PLANNER_WEIGHTS.otherTechnicianKm : 0
        const cand = bestDay(P, book, v, t, 0, extra, -1, skipFor(t))
        if (cand && (!pick || cand.cost < pick.cost)) {
          pick = cand
          pickTech = t
        }
      }
      if (pick) spillTech[c] = pickTech
    }
    return pick ? { t: pickTech, pick } : null
  }

  const unplaced: number[] = []
  for (const [k, v] of order.entries()) {
    if (k > 0 && k % PLANNER_STEP_VISITS === 0) yield { stage: 'planning', done: k, total: toPlace }
    const got = choose(v)
    if (got) book.place(v, got.t, got.pick.d, got.pick.at)
    else unplaced.push(v)
  }
  yield { stage: 'planning', done: toPlace, total: toPlace }

  // Repair: make room for a visit that found none by moving one visit off a day of its window
  // to another day of that visit's own window. Bounded work, so an overloaded season stays fast.
  let budget = PLANNER_WEIGHTS.repairBudget
  for (const [k, v] of unplaced.entries()) {
    if (budget <= 0) break
    if (k % PLANNER_STEP_VISITS === 0) yield { stage: 'repairing', done: toPlace, total: toPlace }
    const c = P.customerOf[v]!
    const techs = [techOfCustomer[c]!, ...others(c, techOfCustomer[c]!).slice(0, PLANNER_WEIGHTS.repairTechnicians)].filter(t => t >= 0)
    let done = false
    for (const t of techs) {
      for (let d = P.earliest[v]!; d <= P.latest[v]! && !done && budget > 0; d++) {
        const r = book.routeOf(t, d)
        if (!P.available[t]![d] || !r || r.stops.length === 0) continue
        const need = book.usedMinutes(t, d) + P.duration[v]! - P.techs[t]!.capacityMinutes
        for (let k = 0; k < r.stops.length && !done && budget > 0; k++) {
          const u = r.stops[k]!
          budget--
          // Taking u out frees its minutes and at most its legs' driving: too little, skip it.
          if (P.lockedTech[u]! >= 0 || P.duration[u]! + (r.legKm[k]! + (r.legKm[k + 1] ?? 0)) * P.minutesPerKm < need) continue
          const undo = book.remove(u)
          const at = book.fits(v, t, d)
          if (at) {
            book.place(v, t, d, at)
            const alt = choose(u, t, d)
            if (alt) {
              book.place(u, alt.t, alt.pick.d, alt.pick.at)
              done = true
              break
            }
            book.remove(v)
          }
          undo()
        }
      }
      if (done) break
    }
  }
  return book.finish()
}
