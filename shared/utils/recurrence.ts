// Visit dates from a plan's RFC 5545 recurrence rules, in company-local calendar dates, and the
// reconciliation of generated visits with what is already on the schedule. Pure: no I/O.
import { DateTime } from 'luxon'
import * as rruleModule from 'rrule'
import type { LocalDate } from './company-time'

// rrule ships ESM (bundlers, vitest) and a UMD build (plain Node): take RRule from either.
const RRule = (rruleModule.RRule ?? (rruleModule as unknown as { default: typeof rruleModule }).default.RRule) as typeof rruleModule.RRule

export class RecurrenceRuleError extends RangeError {
  constructor(message: string) {
    super(message)
    this.name = 'RecurrenceRuleError'
  }
}

const MAX_OCCURRENCES_PER_TERM = 400

/**
 * Checks an RRULE body (no DTSTART, no UNTIL: the contract term supplies both) and returns it in
 * canonical form. Throws RecurrenceRuleError with a plain message when it is not usable.
 */
export function normalizeVisitRule(rule: string): string {
  const body = rule.trim().replace(/^RRULE:/i, '').toUpperCase()
  if (!body) throw new RecurrenceRuleError('Enter a recurrence rule, e.g. FREQ=WEEKLY;INTERVAL=2;BYDAY=TU')
  if (/DTSTART|UNTIL/i.test(body)) throw new RecurrenceRuleError('Leave out DTSTART and UNTIL: the contract\'s term sets them')
  let options
  let canonical: string
  try {
    options = RRule.parseString(body)
    canonical = new RRule(options).toString().replace(/^RRULE:/, '')
  }
  catch {
    throw new RecurrenceRuleError('This is not a valid RFC 5545 recurrence rule')
  }
  if (options.freq === undefined) throw new RecurrenceRuleError('The rule needs a FREQ, e.g. FREQ=WEEKLY')
  if (options.freq > RRule.DAILY) throw new RecurrenceRuleError('Visits repeat at most daily: use YEARLY, MONTHLY, WEEKLY or DAILY')
  if (options.interval !== undefined && (options.interval < 1 || options.interval > 52)) throw new RecurrenceRuleError('INTERVAL must be between 1 and 52')
  if (options.byhour != null || options.byminute != null || options.bysecond != null) throw new RecurrenceRuleError('Visit rules pick days, not times of day')
  return canonical
}

export function describeVisitRule(rule: string): string {
  return RRule.fromString(normalizeVisitRule(rule)).toText()
}

function toUtcMidnight(d: LocalDate) {
  const [y, m, day] = d.split('-').map(Number) as [number, number, number]
  return new Date(Date.UTC(y, m - 1, day))
}
function fromUtc(d: Date): LocalDate {
  return d.toISOString().slice(0, 10)
}
export function isLocalDate(d: string): boolean {
  // Plain arithmetic, not a date library: the planner checks every visit's dates with this.
  if (!/^\d{4}-\d{2}-\d{2}$/.test(d)) return false
  const year = Number(d.slice(0, 4))
  const month = Number(d.slice(5, 7))
  const day = Number(d.slice(8, 10))
  if (month < 1 || month > 12 || day < 1) return false
  const leap = year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0)
  return day <= (month === 2 ? (leap ? 29 : 28) : [4, 6, 9, 11].includes(month) ? 30 : 31)
}

/**
 * The dates a rule yields within a term (both ends included). The term's first day is the
 * rule's DTSTART, so INTERVAL counts from it and a mid-season start simply yields fewer dates.
 * Dates are floating calendar dates: daylight-saving changes cannot move them.
 */
export function expandVisitRule(rule: string, termStart: LocalDate, termEnd: LocalDate): LocalDate[] {
  if (!isLocalDate(termStart) || !isLocalDate(termEnd)) throw new RecurrenceRuleError('Term dates must be YYYY-MM-DD')
  if (termEnd < termStart) throw new RecurrenceRuleError('The term ends before it starts')
  const options = RRule.parseString(normalizeVisitRule(rule))
  const r = new RRule({ ...options, dtstart: toUtcMidnight(termStart), until: new Date(toUtcMidnight(termEnd).getTime() + 86_399_000) })
  const dates: LocalDate[] = []
  r.all((d, i) => {
    if (i >= MAX_OCCURRENCES_PER_TERM) return false
    dates.push(fromUtc(d))
    return true
  })
  return dates
}

export interface WorkCalendar {
  /** ISO weekdays worked, 1 = Monday … 7 = Sunday. */
  workingDays: readonly number[]
  /** Closed dates (holidays). */
  closed: ReadonlySet<LocalDate> | readonly LocalDate[]
}

function isWorkingDay(d: LocalDate, cal: WorkCalendar) {
  const weekday = DateTime.fromISO(d, { zone: 'utc' }).weekday
  const closed = cal.closed instanceof Set ? cal.closed.has(d) : (cal.closed as readonly string[]).includes(d)
  return cal.workingDays.includes(weekday) && !closed
}

/**
 * The nearest working day to `d`: `d` itself when it is one; else the closest working day within
 * the bounds, the later one on a tie (a Saturday goes to Friday, a Sunday to Monday when both are
 * worked). Null when no working day lies within 14 days and the bounds.
 */
export function nearestWorkingDay(d: LocalDate, cal: WorkCalendar, bounds?: { from: LocalDate, to: LocalDate }): LocalDate | null {
  if (!cal.workingDays.length) return null
  const base = DateTime.fromISO(d, { zone: 'utc' })
  const inBounds = (x: LocalDate) => !bounds || (x >= bounds.from && x <= bounds.to)
  for (let offset = 0; offset <= 14; offset++) {
    for (const sign of offset === 0 ? [0] : [1, -1]) {
      const candidate = base.plus({ days: sign * offset }).toISODate()!
      if (inBounds(candidate) && isWorkingDay(candidate, cal)) return candidate
    }
  }
  return null
}

export interface VisitTemplateRule { id: string, rrule: string }
export interface PlannedVisit { key: string, templateId: string, originalDate: LocalDate, date: LocalDate }

/** Every visit a term should have: each template's dates moved onto working days, keyed `templateId:originalDate`. */
export function planVisitDates(templates: readonly VisitTemplateRule[], term: { start: LocalDate, end: LocalDate }, cal: WorkCalendar): PlannedVisit[] {
  const out: PlannedVisit[] = []
  for (const t of templates) {
    const taken = new Set<LocalDate>()
    for (const originalDate of expandVisitRule(t.rrule, term.start, term.end)) {
      const date = nearestWorkingDay(originalDate, cal, { from: term.start, to: term.end })
      // Two occurrences of one template moved onto the same day make one visit.
      if (!date || taken.has(date)) continue
      taken.add(date)
      out.push({ key: `${t.id}:${originalDate}`, templateId: t.id, originalDate, date })
    }
  }
  return out.sort((a, b) => a.date.localeCompare(b.date) || a.key.localeCompare(b.key))
}

/** A local date and HH:MM in a time zone, as an instant (daylight saving applied). */
export function localTimeToInstant(date: LocalDate, time: string, timeZone: string): Date {
  const dt = DateTime.fromISO(`${date}T${time}`, { zone: timeZone })
  if (!dt.isValid) throw new RecurrenceRuleError(`Not a valid local time: ${date} ${time} in ${timeZone}`)
  return dt.toJSDate()
}


/** Adds months to a term start and returns the term's last day (start + months − 1 day). */
export function termEndFor(start: LocalDate, months: number): LocalDate {
  return DateTime.fromISO(start, { zone: 'utc' }).plus({ months }).minus({ days: 1 }).toISODate()!
}


/** Reasons the system cancels a visit; such a visit comes back if the plan wants it again. */
export const REVIVABLE_CANCEL_REASONS = ['No longer in the plan', 'Contract paused'] as const

export interface ExistingVisit {
  id: string
  generationKey: string | null
  status: 'scheduled' | 'in_progress' | 'done' | 'skipped' | 'cancelled'
  movedManually: boolean
  scheduledOn: LocalDate
  statusReason: string
}

export interface Reconciliation {
  insert: PlannedVisit[]
  /** Future, unstarted visits whose date changed (or that come back from a system cancellation). */
  reschedule: Array<{ id: string, date: LocalDate, revive: boolean }>
  /** Future, unstarted visits the plan no longer has. */
  cancel: string[]
  /** Visits left exactly as they are. */
  keep: string[]
}

/**
 * What regeneration does. Only future (date ≥ today), unstarted, not manually moved visits change;
 * done, under way, skipped and moved visits stay; nothing is duplicated (a key exists once) and
 * nothing is dropped (a visit the plan no longer has is cancelled, not deleted).
 */
export function reconcileVisits(existing: readonly ExistingVisit[], planned: readonly PlannedVisit[], today: LocalDate): Reconciliation {
  const byKey = new Map(existing.filter(e => e.generationKey).map(e => [e.generationKey!, e]))
  const plannedKeys = new Set(planned.map(p => p.key))
  const result: Reconciliation = { insert: [], reschedule: [], cancel: [], keep: [] }
  const changeable = (e: ExistingVisit) => e.status === 'scheduled' && !e.movedManually && e.scheduledOn >= today

  for (const p of planned) {
    const e = byKey.get(p.key)
    if (!e) {
      if (p.date >= today) result.insert.push(p)
      continue
    }
    if (e.status === 'cancelled' && (REVIVABLE_CANCEL_REASONS as readonly string[]).includes(e.statusReason) && p.date >= today) {
      result.reschedule.push({ id: e.id, date: p.date, revive: true })
    }
    else if (changeable(e) && e.scheduledOn !== p.date && p.date >= today) {
      result.reschedule.push({ id: e.id, date: p.date, revive: false })
    }
    else {
      result.keep.push(e.id)
    }
  }
  for (const e of existing) {
    if (!e.generationKey || plannedKeys.has(e.generationKey)) continue
    const revivable = e.status === 'cancelled' && (REVIVABLE_CANCEL_REASONS as readonly string[]).includes(e.statusReason)
    // A visit a person moved stays where they put it, even after a pause and resume.
    if (e.movedManually && revivable && e.scheduledOn >= today) result.reschedule.push({ id: e.id, date: e.scheduledOn, revive: true })
    else if (changeable(e)) result.cancel.push(e.id)
    else result.keep.push(e.id)
  }
  return result
}
