// The planner's input and output shapes. Dates are company-local calendar dates (YYYY-MM-DD).
import type { LocalDate } from '../company-time'

/** A visit to place: any day of its window, on a technician's working day with room. */
export interface PlannerVisit {
  /** Unique within one call. */
  id: string
  windowEarliest: LocalDate
  windowLatest: LocalDate
  /** The day the rhythm wants; defaults to the middle of the window. Days nearer it are preferred. */
  preferred?: LocalDate
  /** Time on site, whole or fractional minutes above 0. */
  durationMinutes: number
  siteId: string
  lat: number
  lon: number
  customerId: string
  /** Moved or assigned by hand: stays on this day with this technician and counts against capacity. */
  locked?: { day: LocalDate, technicianId: string }
}

export interface PlannerTechnician {
  id: string
  /** For the reasons in plain words ("every working day of Tess and Dario is full"); the id when absent. */
  name?: string
  /** Minutes of work a day, visits and driving together. */
  capacityMinutes: number
  /** ISO weekdays worked, 1 = Monday … 7 = Sunday. */
  workingDays: readonly number[]
  daysOff?: readonly LocalDate[]
  /** Where each day's route starts (open route: no return leg, as route-order.ts). */
  home: { lat: number, lon: number }
}

export interface PlannerInput {
  visits: readonly PlannerVisit[]
  technicians: readonly PlannerTechnician[]
  /** The company's closed days: nobody works. */
  closedDays?: readonly LocalDate[]
  /** Average door-to-door driving speed; default ROUTE_ASSUMPTIONS.speedKmh (common practice, no source). */
  speedKmh?: number
  /** Road km per great-circle km; default ROUTE_ASSUMPTIONS.detourFactor (common practice, no source). */
  detourFactor?: number
  /** customerId → technicianId: who served the customer before, kept where possible. */
  previousAssignments?: Readonly<Record<string, string>>
  /** How dates read in the reasons: 'day-month' (default) "1 Apr", 'month-day' "Apr 1". */
  dateOrder?: 'day-month' | 'month-day'
  /**
   * Answer only for the technician-days that got a visit being planned: `placed` and `days` (and
   * the stats' days, km and minutes) leave out the days that hold nothing but locked visits, whose
   * routes are then not checked. For callers that only write the new visits (a renewal batch next
   * to a season of booked ones); the plan itself is the same.
   */
  onlyPlannedDays?: boolean
}

export interface PlannerPlacement {
  visitId: string
  day: LocalDate
  technicianId: string
  /** 1-based position in the technician's route that day. */
  order: number
}

/** no-working-day: no technician works any day of the window; days-full: every such day is full; too-long: longer than any technician's whole day. */
export type PlannerUnplacedCode = 'no-working-day' | 'days-full' | 'too-long'

export interface PlannerUnplaced {
  visitId: string
  /** Plain words for the owner, naming the window and whose days were full. */
  reason: string
  code: PlannerUnplacedCode
}

/** One technician's day with at least one visit. Minutes and km are estimates (route-order.ts assumptions). */
export interface PlannerDay {
  day: LocalDate
  technicianId: string
  visits: number
  visitMinutes: number
  driveMinutes: number
  capacityMinutes: number
  /** Road km: great-circle km of the day's open route × detourFactor. */
  km: number
}

export interface PlannerStats {
  visits: number
  placed: number
  locked: number
  unplaced: number
  unplacedByCode: Record<PlannerUnplacedCode, number>
  technicianDays: number
  /** Days whose visits and driving exceed capacity: only possible when locked visits alone overfill a day. */
  daysOverCapacity: number
  totalKm: number
  totalDriveMinutes: number
  totalVisitMinutes: number
  /** Share of customers with placed visits whose visits all went to one technician (0–1). */
  customersWithOneTechnician: number
  speedKmh: number
  detourFactor: number
}

export interface SeasonPlan {
  placed: PlannerPlacement[]
  unplaced: PlannerUnplaced[]
  days: PlannerDay[]
  stats: PlannerStats
}

export interface PlannerMove {
  visitId: string
  /** Where it is now; null when it is not placed now. */
  from: { day: LocalDate, technicianId: string } | null
  /** Where the new plan puts it; null when it could not be placed (see `reason`). */
  to: { day: LocalDate, technicianId: string } | null
  reason?: string
}

export interface ReplanPreview {
  /** What would change; visits that stay put are not listed. Nothing is applied. */
  moves: PlannerMove[]
  /** The whole plan the moves come from (visits outside the range as they are). */
  plan: SeasonPlan
}

/** Thrown on unusable input; `field` names it, e.g. "visits[3].windowLatest". */
export class PlannerInputError extends RangeError {
  readonly field: string
  constructor(field: string, message: string) {
    super(`${field}: ${message}`)
    this.name = 'PlannerInputError'
    this.field = field
  }
}
