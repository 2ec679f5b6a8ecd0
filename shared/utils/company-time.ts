// The company's calendar: "today" in its time zone, local calendar dates (YYYY-MM-DD) and how
// dates and instants read. A local date is a floating calendar day: no time zone can shift it.
// Pure: no I/O; the clock is a parameter.
import { DateTime } from 'luxon'

/** A company-local calendar date, YYYY-MM-DD. */
export type LocalDate = string

/** One locale for every date shown, so the server's render and the browser's agree. */
const LOCALE = 'en-US'

/** Today's date in a time zone (the company's today, wherever the browser or server is). */
export function localToday(timeZone: string, now: Date = new Date()): LocalDate {
  return DateTime.fromJSDate(now, { zone: timeZone }).toISODate()!
}

function utcDay(d: LocalDate) {
  return DateTime.fromISO(d, { zone: 'utc' })
}

export function addDays(d: LocalDate, days: number): LocalDate {
  return utcDay(d).plus({ days }).toISODate()!
}

/** The date `months` after a date, kept to the month's end when the day does not exist (Jan 31 + 1 → Feb 28). */
export function addMonths(d: LocalDate, months: number): LocalDate {
  return utcDay(d).plus({ months }).toISODate()!
}

/** ISO weekday of a local date: 1 = Monday … 7 = Sunday. */
export function isoWeekday(d: LocalDate): number {
  return utcDay(d).weekday
}

/** The Monday of the week a local date lies in. */
export function weekStart(d: LocalDate): LocalDate {
  return addDays(d, 1 - isoWeekday(d))
}

/** The seven days of a week, Monday first. */
export function weekDays(d: LocalDate): LocalDate[] {
  const monday = weekStart(d)
  return Array.from({ length: 7 }, (_, i) => addDays(monday, i))
}

/** The days of a month grid: whole Monday-to-Sunday weeks covering the month of a local date. */
export function monthGridDays(d: LocalDate): LocalDate[] {
  const first = `${d.slice(0, 7)}-01`
  const last = utcDay(first).endOf('month').toISODate()!
  const out: LocalDate[] = []
  for (let day = weekStart(first); day <= addDays(weekStart(last), 6); day = addDays(day, 1)) out.push(day)
  return out
}

/** The names of the ISO weekdays, Monday first. */
export const WEEKDAY_SHORT_NAMES = ['Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat', 'Sun'] as const

/** How a local date can read. */
export const LOCAL_DATE_STYLES = {
  /** "Wed, Mar 4, 2026" */
  weekdayDate: { weekday: 'short', month: 'short', day: 'numeric', year: 'numeric' },
  /** "Wed, Mar 4" */
  weekdayMonthDay: { weekday: 'short', month: 'short', day: 'numeric' },
  /** "Wednesday, March 4" */
  longWeekdayMonthDay: { weekday: 'long', month: 'long', day: 'numeric' },
  /** "Wednesday, March 4, 2026" */
  longWeekdayDate: { weekday: 'long', month: 'long', day: 'numeric', year: 'numeric' },
  /** "Wed, March 4, 2026" */
  weekdayLongDate: { weekday: 'short', month: 'long', day: 'numeric', year: 'numeric' },
  /** "Mar 4, 2026" */
  date: { month: 'short', day: 'numeric', year: 'numeric' },
  /** "March 4, 2026" */
  longDate: { month: 'long', day: 'numeric', year: 'numeric' },
  /** "Mar 4" */
  monthDay: { month: 'short', day: 'numeric' },
  /** "March 2026" */
  monthYear: { month: 'long', year: 'numeric' },
  /** "Mar 26" */
  shortMonthYear: { month: 'short', year: '2-digit' },
  /** "March" */
  monthName: { month: 'long' },
  /** "Mar" */
  shortMonthName: { month: 'short' },
  /** "Wed" */
  weekday: { weekday: 'short' },
  /** "Wednesday" */
  longWeekday: { weekday: 'long' },
  /** "4" */
  dayOfMonth: { day: 'numeric' },
} as const satisfies Record<string, Intl.DateTimeFormatOptions>
export type LocalDateStyle = keyof typeof LOCAL_DATE_STYLES

const formatters = new Map<string, Intl.DateTimeFormat>()
function formatter(opts: Intl.DateTimeFormatOptions, timeZone: string) {
  const key = `${timeZone}|${JSON.stringify(opts)}`
  let f = formatters.get(key)
  if (!f) formatters.set(key, (f = new Intl.DateTimeFormat(LOCALE, { ...opts, timeZone })))
  return f
}

/** A local calendar date as people read it; 'YYYY-MM' reads as its month. */
export function formatLocalDate(d: LocalDate, style: LocalDateStyle = 'weekdayDate'): string {
  const ymd = d.length === 7 ? `${d}-15` : d
  return formatter(LOCAL_DATE_STYLES[style], 'UTC').format(new Date(`${ymd}T12:00:00Z`))
}

/** The name of a month, 1 = January; `short` gives "Jan". */
export function monthName(month: number, short = false): string {
  return formatLocalDate(`2000-${String(month).padStart(2, '0')}-15`, short ? 'shortMonthName' : 'monthName')
}

/** How an instant can read on the company's clock. */
export const INSTANT_STYLES = {
  /** "Mar 4, 2026, 3:05 PM" */
  dateTime: { dateStyle: 'medium', timeStyle: 'short' },
  /** "Mar 4, 2026" */
  date: { dateStyle: 'medium' },
  /** "Mar 4" */
  monthDay: { month: 'short', day: 'numeric' },
  /** "3:05 PM" */
  time: { hour: 'numeric', minute: '2-digit' },
} as const satisfies Record<string, Intl.DateTimeFormatOptions>
export type InstantStyle = keyof typeof INSTANT_STYLES

/** An instant (Date, ISO text or epoch milliseconds) on the company's clock; `empty` when missing or invalid. */
export function formatInstant(when: string | number | Date | null | undefined, timeZone: string, style: InstantStyle = 'dateTime', empty = '—'): string {
  if (when == null || when === '') return empty
  const d = when instanceof Date ? when : new Date(when)
  return Number.isNaN(d.getTime()) ? empty : formatter(INSTANT_STYLES[style], timeZone).format(d)
}

/** The company-local calendar date an instant falls on. */
export function localDateOf(when: string | number | Date, timeZone: string): LocalDate {
  return localToday(timeZone, when instanceof Date ? when : new Date(when))
}

/** The instant a company-local calendar date begins (midnight in the company's zone). */
export function startOfLocalDay(d: LocalDate, timeZone: string): Date {
  return DateTime.fromISO(d, { zone: timeZone }).startOf('day').toJSDate()
}
