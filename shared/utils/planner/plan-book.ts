// The plan being built: every technician-day's route, who got which visit, the capacity check,
// and turning it into the SeasonPlan (with each day's true route checked by route-order.ts).
import type { RouteCoordinate } from '../route-order'
import { checkDayRoute, cheapestInsertion, emptyDayRoute, insertIntoDayRoute, removeFromDayRoute, type DayRoute, type Insertion } from './day-route'
import { plannerDayDate, type PreparedInput } from './prepare'
import type { PlannerDay, PlannerPlacement, PlannerUnplaced, PlannerUnplacedCode, SeasonPlan } from './types'
import { unplacedReason } from './words'

/** Slack for floating-point sums when comparing minutes with capacity. */
export const CAPACITY_EPS_MINUTES = 1e-9

const EMPTY: DayRoute = emptyDayRoute()

export class PlanBook {
  readonly routes: Array<DayRoute | undefined>
  readonly tech: Int32Array
  readonly day: Int32Array
  readonly homes: readonly RouteCoordinate[]
  constructor(readonly input: PreparedInput) {
    this.routes = new Array(input.techs.length * input.nDays)
    this.tech = new Int32Array(input.visits.length).fill(-1)
    this.day = new Int32Array(input.visits.length).fill(-1)
    this.homes = input.techs.map(t => t.home)
  }

  routeOf(t: number, d: number): DayRoute | undefined {
    return this.routes[t * this.input.nDays + d]
  }

  /** Minutes already used on a technician-day (visits and the current route's driving). */
  usedMinutes(t: number, d: number): number {
    const r = this.routeOf(t, d)
    return r ? r.visitMinutes + r.km * this.input.minutesPerKm : 0
  }

  /** Where visit v would go on technician t's day d, or null when t does not work then or it does not fit. */
  fits(v: number, t: number, d: number): Insertion | null {
    const P = this.input
    if (!P.available[t]![d]) return null
    const cap = P.techs[t]!.capacityMinutes + CAPACITY_EPS_MINUTES
    const used = this.usedMinutes(t, d) + P.duration[v]!
    if (used > cap) return null
    const ins = cheapestInsertion(this.routeOf(t, d) ?? EMPTY, this.homes[t]!, P.visits, v)
    return used + ins.deltaKm * P.minutesPerKm <= cap ? ins : null
  }

  /** Puts v on t's day d (no checks: locked visits go where a person put them). */
  place(v: number, t: number, d: number, at?: Insertion): void {
    const key = t * this.input.nDays + d
    let r = this.routes[key]
    if (!r) {
      r = emptyDayRoute()
      this.routes[key] = r
    }
    insertIntoDayRoute(r, this.homes[t]!, this.input.visits, v, at ?? cheapestInsertion(r, this.homes[t]!, this.input.visits, v), this.input.duration[v]!)
    this.tech[v] = t
    this.day[v] = d
  }

  /** Takes v off its day; returns a function that puts it back exactly where it was. */
  remove(v: number): () => void {
    const t = this.tech[v]!
    const d = this.day[v]!
    const r = this.routeOf(t, d)!
    const k = r.stops.indexOf(v)
    removeFromDayRoute(r, this.homes[t]!, this.input.visits, k, this.input.duration[v]!)
    this.tech[v] = -1
    this.day[v] = -1
    return () => this.place(v, t, d, { position: k, deltaKm: 0 })
  }

  /** Locked visits first, where a person put them, counting against capacity. */
  placeLocked(): void {
    const P = this.input
    for (let v = 0; v < P.visits.length; v++) {
      if (P.lockedTech[v]! >= 0) this.place(v, P.lockedTech[v]!, P.lockedDay[v]!)
    }
  }

  /** The finished plan: each day's route checked with route-order.ts, unplaced visits with their reasons. */
  finish(): SeasonPlan {
    const P = this.input
    const ids = P.visits.map(v => v.id)
    const placed: PlannerPlacement[] = []
    const days: PlannerDay[] = []
    let totalKm = 0
    let totalDrive = 0
    let totalVisit = 0
    let over = 0
    // With onlyPlannedDays, the technician-days that got a visit being planned.
    let planned: Uint8Array | null = null
    if (P.onlyPlannedDays) {
      planned = new Uint8Array(this.routes.length)
      for (let v = 0; v < P.visits.length; v++) if (this.tech[v]! >= 0 && P.lockedTech[v]! < 0) planned[this.tech[v]! * P.nDays + this.day[v]!] = 1
    }
    for (let d = 0; d < P.nDays; d++) {
      for (let t = 0; t < P.techs.length; t++) {
        const r = this.routeOf(t, d)
        if (!r || r.stops.length === 0 || (planned && !planned[t * P.nDays + d])) continue
        const checked = checkDayRoute(r, this.homes[t]!, P.visits, ids, { speedKmh: P.speedKmh, detourFactor: P.detourFactor })
        const date = plannerDayDate(P.firstDay + d)
        const technicianId = P.techs[t]!.id
        checked.order.forEach((v, k) => placed.push({ visitId: ids[v]!, day: date, technicianId, order: k + 1 }))
        const capacityMinutes = P.techs[t]!.capacityMinutes
        if (r.visitMinutes + checked.driveMinutes > capacityMinutes + 1e-6) over++
        days.push({ day: date, technicianId, visits: r.stops.length, visitMinutes: r.visitMinutes, driveMinutes: checked.driveMinutes, capacityMinutes, km: checked.km })
        totalKm += checked.km
        totalDrive += checked.driveMinutes
        totalVisit += r.visitMinutes
      }
    }
    const unplaced: PlannerUnplaced[] = []
    const unplacedByCode: Record<PlannerUnplacedCode, number> = { 'no-working-day': 0, 'days-full': 0, 'too-long': 0 }
    for (let v = 0; v < P.visits.length; v++) {
      if (this.tech[v]! >= 0) continue
      const why = unplacedReason(P, this.homes, v)
      unplacedByCode[why.code]++
      unplaced.push({ visitId: ids[v]!, ...why })
    }
    const techsOfCustomer = new Map<number, Set<number>>()
    for (let v = 0; v < P.visits.length; v++) {
      if (this.tech[v]! < 0) continue
      const c = P.customerOf[v]!
      let s = techsOfCustomer.get(c)
      if (!s) techsOfCustomer.set(c, (s = new Set()))
      s.add(this.tech[v]!)
    }
    const loyal = [...techsOfCustomer.values()].filter(s => s.size === 1).length
    let locked = 0
    for (let v = 0; v < P.visits.length; v++) if (P.lockedTech[v]! >= 0) locked++
    return {
      placed, unplaced, days,
      stats: {
        visits: P.visits.length, placed: placed.length, locked, unplaced: unplaced.length, unplacedByCode, technicianDays: days.length,
        daysOverCapacity: over, totalKm, totalDriveMinutes: totalDrive, totalVisitMinutes: totalVisit,
        customersWithOneTechnician: techsOfCustomer.size ? loyal / techsOfCustomer.size : 1, speedKmh: P.speedKmh, detourFactor: P.detourFactor,
      },
    }
  }
}
