// The planner's reasons in plain words: which window, and whose days were full.
import { monthName } from '../company-time'
import { greatCircleKm, type RouteCoordinate } from '../route-order'
import { plannerDayDate, type PreparedInput } from './prepare'
import type { PlannerUnplacedCode } from './types'

/** "1 Apr" (day-month) or "Apr 1" (month-day). */
export function plannerDateWords(date: string, order: 'day-month' | 'month-day'): string {
  const m = monthName(Number(date.slice(5, 7)), true)
  const d = Number(date.slice(8, 10))
  return order === 'month-day' ? `${m} ${d}` : `${d} ${m}`
}

function listWords(names: string[], total: number): string {
  if (names.length === total && total > 3) return `all ${total} technicians`
  if (names.length > 3) return `${names.length} technicians`
  if (names.length <= 1) return names[0] ?? ''
  return `${names.slice(0, -1).join(', ')} and ${names.at(-1)}`
}

/** Why visit v has no place. */
export function unplacedReason(P: PreparedInput, homes: readonly RouteCoordinate[], v: number): { code: PlannerUnplacedCode, reason: string } {
  const e = P.earliest[v]!
  const l = P.latest[v]!
  const from = plannerDayDate(P.firstDay + e)
  const to = plannerDayDate(P.firstDay + l)
  const when = e === l ? `on ${plannerDateWords(from, P.dateOrder)}` : `between ${plannerDateWords(from, P.dateOrder)} and ${plannerDateWords(to, P.dateOrder)}`
  const working: number[] = []
  P.techs.forEach((_, t) => {
    for (let d = e; d <= l; d++) {
      if (P.available[t]![d]) {
        working.push(t)
        return
      }
    }
  })
  if (P.techs.length === 0) return { code: 'no-working-day', reason: `No technician to plan with ${when}` }
  if (working.length === 0) return { code: 'no-working-day', reason: `No working day ${when}: weekends, closed days and days off cover the whole window` }
  const duration = P.duration[v]!
  // The least a single visit needs from each working technician: the visit and the drive to it.
  const fitsSomeone = working.some(t => duration + greatCircleKm(homes[t]!, P.visits[v]!) * P.minutesPerKm <= P.techs[t]!.capacityMinutes)
  if (!fitsSomeone) {
    const longest = Math.max(...working.map(t => P.techs[t]!.capacityMinutes))
    return { code: 'too-long', reason: `It takes ${Math.round(duration)} minutes plus the drive there, more than a whole working day ${when} (the longest is ${Math.round(longest)} minutes)` }
  }
  const names = working.map(t => P.techs[t]!.name ?? P.techs[t]!.id)
  return { code: 'days-full', reason: `No room ${when}: every working day of ${listWords(names, P.techs.length)} is full (none has ${Math.round(duration)} minutes free with the driving)` }
}
