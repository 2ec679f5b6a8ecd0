// Checks the planner's input (throwing PlannerInputError naming the field) and turns it into
// compact arrays indexed by visit, technician and day number.
import { isLocalDate } from '../recurrence'
import type { LocalDate } from '../company-time'
import { ROUTE_ASSUMPTIONS } from '../route-order'
import { PlannerInputError, type PlannerInput, type PlannerTechnician, type PlannerVisit } from './types'

const DAY_MS = 86_400_000

/** Days since 1970-01-01 of a calendar date. */
export function plannerDayNumber(d: LocalDate): number {
  return Math.round(Date.parse(`${d}T00:00:00Z`) / DAY_MS)
}
export function plannerDayDate(n: number): LocalDate {
  return new Date(n * DAY_MS).toISOString().slice(0, 10)
}
/** ISO weekday (1 = Monday … 7 = Sunday) of a day number; 1970-01-01 was a Thursday. */
export function plannerWeekday(n: number): number {
  return ((n % 7) + 7 + 3) % 7 + 1
}

export interface PreparedInput {
  visits: readonly PlannerVisit[]
  techs: readonly PlannerTechnician[]
  techIndex: ReadonlyMap<string, number>
  /** Day number of day index 0; day indexes run 0 … nDays − 1. */
  firstDay: number
  nDays: number
  earliest: Int32Array
  latest: Int32Array
  preferred: Int32Array
  duration: Float64Array
  customerOf: Int32Array
  customers: string[]
  /** Technician index of a locked visit, −1 when free. */
  lockedTech: Int32Array
  lockedDay: Int32Array
  /** available[t][d] = 1 when technician t works day index d (working weekday, not off, not closed). */
  available: Uint8Array[]
  speedKmh: number
  detourFactor: number
  /** Driving minutes per great-circle km: detourFactor / speedKmh × 60. */
  minutesPerKm: number
  previous: Int32Array
  dateOrder: 'day-month' | 'month-day'
  onlyPlannedDays: boolean
}

function checkDate(value: unknown, field: string): LocalDate {
  if (typeof value !== 'string' || !isLocalDate(value)) throw new PlannerInputError(field, 'must be a date as YYYY-MM-DD')
  return value
}
function checkNumber(value: unknown, field: string, min: number, max: number, what: string) {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) throw new PlannerInputError(field, `must be ${what}`)
  return value
}
function checkId(value: unknown, field: string) {
  if (typeof value !== 'string' || value === '') throw new PlannerInputError(field, 'must be a non-empty text id')
  return value
}

/** Longest span of days one call may cover (two years), to keep a typo from planning a century. */
const MAX_DAYS = 731

export function preparePlannerInput(input: PlannerInput): PreparedInput {
  if (!input || typeof input !== 'object') throw new PlannerInputError('input', 'must be an object with visits and technicians')
  if (!Array.isArray(input.visits)) throw new PlannerInputError('visits', 'must be a list')
  if (!Array.isArray(input.technicians)) throw new PlannerInputError('technicians', 'must be a list')
  const speedKmh = checkNumber(input.speedKmh ?? ROUTE_ASSUMPTIONS.speedKmh, 'speedKmh', 1, 200, 'an average driving speed from 1 to 200 km/h')
  const detourFactor = checkNumber(input.detourFactor ?? ROUTE_ASSUMPTIONS.detourFactor, 'detourFactor', 1, 5, 'a detour factor from 1 to 5')

  const techIndex = new Map<string, number>()
  input.technicians.forEach((t: PlannerTechnician, i: number) => {
    const f = `technicians[${i}]`
    checkId(t?.id, `${f}.id`)
    if (techIndex.has(t.id)) throw new PlannerInputError(`${f}.id`, `"${t.id}" is listed twice`)
    techIndex.set(t.id, i)
    checkNumber(t.capacityMinutes, `${f}.capacityMinutes`, 0, 24 * 60, 'minutes of work a day, from 0 to 1440')
    if (!Array.isArray(t.workingDays) || t.workingDays.some((d: number) => !Number.isInteger(d) || d < 1 || d > 7)) throw new PlannerInputError(`${f}.workingDays`, 'must list ISO weekdays, 1 = Monday … 7 = Sunday')
    ;(t.daysOff ?? []).forEach((d: LocalDate, j: number) => checkDate(d, `${f}.daysOff[${j}]`))
    if (!t.home || typeof t.home !== 'object') throw new PlannerInputError(`${f}.home`, 'must be a position with lat and lon')
    checkNumber(t.home.lat, `${f}.home.lat`, -90, 90, 'a latitude from -90 to 90')
    checkNumber(t.home.lon, `${f}.home.lon`, -180, 180, 'a longitude from -180 to 180')
  })
  ;(input.closedDays ?? []).forEach((d, j) => checkDate(d, `closedDays[${j}]`))

  const n = input.visits.length
  const earliest = new Int32Array(n)
  const latest = new Int32Array(n)
  const preferred = new Int32Array(n)
  const duration = new Float64Array(n)
  const customerOf = new Int32Array(n)
  const lockedTech = new Int32Array(n).fill(-1)
  const lockedDay = new Int32Array(n)
  const customerIndex = new Map<string, number>()
  const customers: string[] = []
  const ids = new Set<string>()
  let lo = Infinity
  let hi = -Infinity
  // A season has a few hundred distinct dates over many thousand visits: each is checked and counted once.
  const dayNumbers = new Map<string, number>()
  const dayOf = (value: unknown, field: string) => {
    let n = typeof value === 'string' ? dayNumbers.get(value) : undefined
    if (n === undefined) dayNumbers.set(value as string, (n = plannerDayNumber(checkDate(value, field))))
    return n
  }
  input.visits.forEach((v: PlannerVisit, i: number) => {
    const f = `visits[${i}]`
    checkId(v?.id, `${f}.id`)
    if (ids.has(v.id)) throw new PlannerInputError(`${f}.id`, `"${v.id}" is listed twice`)
    ids.add(v.id)
    earliest[i] = dayOf(v.windowEarliest, `${f}.windowEarliest`)
    latest[i] = dayOf(v.windowLatest, `${f}.windowLatest`)
    if (latest[i]! < earliest[i]!) throw new PlannerInputError(`${f}.windowLatest`, 'the window ends before it starts')
    if (v.preferred !== undefined) {
      preferred[i] = dayOf(v.preferred, `${f}.preferred`)
      if (preferred[i]! < earliest[i]! || preferred[i]! > latest[i]!) throw new PlannerInputError(`${f}.preferred`, 'must lie inside the window')
    }
    else {
      preferred[i] = Math.floor((earliest[i]! + latest[i]!) / 2)
    }
    duration[i] = checkNumber(v.durationMinutes, `${f}.durationMinutes`, Number.MIN_VALUE, 24 * 60, 'minutes on site, above 0 and at most 1440')
    checkId(v.siteId, `${f}.siteId`)
    checkNumber(v.lat, `${f}.lat`, -90, 90, 'a latitude from -90 to 90')
    checkNumber(v.lon, `${f}.lon`, -180, 180, 'a longitude from -180 to 180')
    checkId(v.customerId, `${f}.customerId`)
    let c = customerIndex.get(v.customerId)
    if (c === undefined) {
      c = customers.length
      customers.push(v.customerId)
      customerIndex.set(v.customerId, c)
    }
    customerOf[i] = c
    lo = Math.min(lo, earliest[i]!)
    hi = Math.max(hi, latest[i]!)
    if (v.locked) {
      const t = techIndex.get(v.locked.technicianId)
      if (t === undefined) throw new PlannerInputError(`${f}.locked.technicianId`, `no technician "${String(v.locked.technicianId)}" in technicians`)
      lockedTech[i] = t
      lockedDay[i] = dayOf(v.locked.day, `${f}.locked.day`)
      lo = Math.min(lo, lockedDay[i]!)
      hi = Math.max(hi, lockedDay[i]!)
    }
  })
  if (n === 0) {
    lo = 0
    hi = 0
  }
  if (hi - lo + 1 > MAX_DAYS) throw new PlannerInputError('visits', `the windows span ${hi - lo + 1} days; plan at most ${MAX_DAYS} days at once`)
  const firstDay = lo
  const nDays = hi - lo + 1
  for (let i = 0; i < n; i++) {
    earliest[i]! -= firstDay
    latest[i]! -= firstDay
    preferred[i]! -= firstDay
    if (lockedTech[i]! >= 0) lockedDay[i]! -= firstDay
  }

  const closed = new Set((input.closedDays ?? []).map(plannerDayNumber))
  const available = input.technicians.map((t) => {
    const off = new Set((t.daysOff ?? []).map(plannerDayNumber))
    const works = new Set(t.workingDays)
    const a = new Uint8Array(nDays)
    for (let d = 0; d < nDays; d++) {
      const day = firstDay + d
      a[d] = works.has(plannerWeekday(day)) && !closed.has(day) && !off.has(day) && t.capacityMinutes > 0 ? 1 : 0
    }
    return a
  })

  const previous = new Int32Array(customers.length).fill(-1)
  for (const [customerId, techId] of Object.entries(input.previousAssignments ?? {})) {
    const c = customerIndex.get(customerId)
    const t = techIndex.get(techId)
    if (c !== undefined && t !== undefined) previous[c] = t
  }

  return {
    visits: input.visits, techs: input.technicians, techIndex, firstDay, nDays, earliest, latest, preferred, duration,
    customerOf, customers, lockedTech, lockedDay, available, speedKmh, detourFactor, minutesPerKm: (detourFactor / speedKmh) * 60,
    previous, dateOrder: input.dateOrder ?? 'day-month', onlyPlannedDays: input.onlyPlannedDays === true,
  }
}
