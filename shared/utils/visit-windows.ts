// When in the season a plan's visit is due, as the owner says it: "once in April", "every 2 weeks
// from May to September, give or take 3 days", "once between 15 October and 15 November",
// "every month from December to February". Pure: no I/O.
//
// Stored form (VisitSchedule): an RFC 5545 RRULE body for the rhythm (FREQ and INTERVAL only),
// a season given as month-day bounds (it may wrap the new year: December to February), and a
// ± tolerance in days around each occurrence. FREQ=YEARLY means "once in the season": the whole
// season is the window. The owner never sees the rule text: describeVisitSchedule() words it.
//
// Every export is auto-imported across the app and server, so the names are specific.
import { monthName, addDays, type LocalDate } from './company-time'
import { expandVisitRule, isLocalDate } from './recurrence'

/** A day of the year as 'MM-DD' (e.g. '04-01'); '02-29' means the last day of February. */
export type MonthDay = string

/** The stored form of a visit template's timing. */
export interface VisitSchedule {
  /** RFC 5545 RRULE body, FREQ and INTERVAL only: 'FREQ=YEARLY' (once), 'FREQ=WEEKLY;INTERVAL=2', 'FREQ=MONTHLY'. */
  rrule: string
  /** First day of the season, 'MM-DD'. */
  from: MonthDay
  /** Last day of the season, 'MM-DD'; earlier than `from` when the season wraps the new year. */
  to: MonthDay
  /** Days either side of each occurrence the visit may move (0 for once-in-the-season). */
  toleranceDays: number
}

export type VisitRepeatUnit = 'day' | 'week' | 'month'

/** The plan form's choices. */
export type VisitScheduleForm =
  | { kind: 'once', from: MonthDay, to: MonthDay }
  | { kind: 'every', interval: number, unit: VisitRepeatUnit, from: MonthDay, to: MonthDay, toleranceDays?: number }

/** One visit's window in a contract term: any day from `earliest` to `latest`, ideally `preferred`. */
export interface VisitWindow {
  /** Stable within one schedule and term: the occurrence's date (for once, the season's first day). Prefix it with the template id. */
  key: string
  earliest: LocalDate
  latest: LocalDate
  preferred: LocalDate
}

/** A schedule or term that cannot be used; `field` names the input in the form's words. */
export class VisitScheduleError extends RangeError {
  readonly field: string
  constructor(field: string, message: string) {
    super(message)
    this.name = 'VisitScheduleError'
    this.field = field
  }
}

const DAYS_IN_MONTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31] as const
const UNIT_FREQ: Record<VisitRepeatUnit, string> = { day: 'DAILY', week: 'WEEKLY', month: 'MONTHLY' }
const FREQ_UNIT: Record<string, VisitRepeatUnit> = { DAILY: 'day', WEEKLY: 'week', MONTHLY: 'month' }
/** Shortest gap between two occurrences, in days (a month is at least 28 days). */
const UNIT_MIN_DAYS: Record<VisitRepeatUnit, number> = { day: 1, week: 7, month: 28 }
const MAX_INTERVAL = 52
const MAX_TOLERANCE_DAYS = 30

function monthDayParts(md: MonthDay): [number, number] {
  return [Number(md.slice(0, 2)), Number(md.slice(3, 5))]
}

function checkMonthDay(value: unknown, field: string): MonthDay {
  if (typeof value !== 'string' || !/^\d{2}-\d{2}$/.test(value)) throw new VisitScheduleError(field, `${field} must be a day of the year as MM-DD, e.g. 04-01 for 1 April`)
  const [m, d] = monthDayParts(value)
  if (m < 1 || m > 12) throw new VisitScheduleError(field, `${field} has no month ${m}: use 01 to 12`)
  if (d < 1 || d > DAYS_IN_MONTH[m - 1]!) throw new VisitScheduleError(field, `${field}: ${monthName(m)} has no day ${d}`)
  return value
}

function checkInterval(value: unknown): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 1 || value > MAX_INTERVAL) {
    throw new VisitScheduleError('interval', `interval must be a whole number from 1 to ${MAX_INTERVAL}`)
  }
  return value
}

function checkTolerance(value: unknown, unit: VisitRepeatUnit, interval: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0 || value > MAX_TOLERANCE_DAYS) {
    throw new VisitScheduleError('toleranceDays', `toleranceDays must be a whole number of days from 0 to ${MAX_TOLERANCE_DAYS}`)
  }
  const gap = UNIT_MIN_DAYS[unit] * interval
  // Two neighbouring windows must not overlap, or one visit could stand for two.
  if (2 * value >= gap) {
    throw new VisitScheduleError('toleranceDays', `toleranceDays must be less than half the gap between visits (${gap} days): at most ${Math.ceil(gap / 2) - 1}`)
  }
  return value
}

/** The plan form's choices → the stored form. Throws VisitScheduleError naming the field. */
export function buildVisitSchedule(form: VisitScheduleForm): VisitSchedule {
  if (form === null || typeof form !== 'object') throw new VisitScheduleError('kind', 'Choose how often: once, or every so many days, weeks or months')
  const from = checkMonthDay(form.from, 'from')
  const to = checkMonthDay(form.to, 'to')
  if (form.kind === 'once') return { rrule: 'FREQ=YEARLY', from, to, toleranceDays: 0 }
  if (form.kind !== 'every') throw new VisitScheduleError('kind', 'kind must be "once" or "every"')
  if (!(form.unit in UNIT_FREQ)) throw new VisitScheduleError('unit', 'unit must be day, week or month')
  const interval = checkInterval(form.interval)
  const toleranceDays = checkTolerance(form.toleranceDays ?? 0, form.unit, interval)
  return { rrule: `FREQ=${UNIT_FREQ[form.unit]}${interval > 1 ? `;INTERVAL=${interval}` : ''}`, from, to, toleranceDays }
}

function parseRhythm(rrule: unknown): { unit: VisitRepeatUnit | 'once', interval: number } {
  if (typeof rrule !== 'string') throw new VisitScheduleError('rrule', 'rrule must be text such as FREQ=WEEKLY;INTERVAL=2')
  const parts = new Map<string, string>()
  for (const part of rrule.trim().replace(/^RRULE:/i, '').toUpperCase().split(';').filter(Boolean)) {
    const [k, v, extra] = part.split('=')
    if (!k || v === undefined || extra !== undefined || parts.has(k)) throw new VisitScheduleError('rrule', `rrule part "${part}" is not NAME=VALUE`)
    parts.set(k, v)
  }
  for (const k of parts.keys()) {
    if (k !== 'FREQ' && k !== 'INTERVAL') throw new VisitScheduleError('rrule', `rrule may hold only FREQ and INTERVAL (the season and tolerance give the rest), not ${k}`)
  }
  const freq = parts.get('FREQ')
  const interval = parts.has('INTERVAL') ? Number(parts.get('INTERVAL')) : 1
  if (freq === 'YEARLY') {
    if (interval !== 1) throw new VisitScheduleError('rrule', 'FREQ=YEARLY means once in the season: leave out INTERVAL')
    return { unit: 'once', interval: 1 }
  }
  const unit = freq === undefined ? undefined : FREQ_UNIT[freq]
  if (!unit) throw new VisitScheduleError('rrule', 'rrule FREQ must be YEARLY (once), MONTHLY, WEEKLY or DAILY')
  if (!/^\d+$/.test(parts.get('INTERVAL') ?? '1')) throw new VisitScheduleError('interval', 'interval must be a whole number')
  return { unit, interval: checkInterval(interval) }
}

/** Checks a stored schedule (e.g. read from JSON) and returns it in canonical form. Throws VisitScheduleError naming the field. */
export function parseVisitSchedule(value: unknown): VisitSchedule {
  if (value === null || typeof value !== 'object') throw new VisitScheduleError('rrule', 'A visit schedule needs rrule, from, to and toleranceDays')
  const v = value as Record<string, unknown>
  const rhythm = parseRhythm(v.rrule)
  const from = checkMonthDay(v.from, 'from')
  const to = checkMonthDay(v.to, 'to')
  if (rhythm.unit === 'once') {
    if (v.toleranceDays !== undefined && v.toleranceDays !== 0) throw new VisitScheduleError('toleranceDays', 'A once-in-the-season visit has the whole season as its window: toleranceDays must be 0')
    return { rrule: 'FREQ=YEARLY', from, to, toleranceDays: 0 }
  }
  return buildVisitSchedule({ kind: 'every', interval: rhythm.interval, unit: rhythm.unit, from, to, toleranceDays: v.toleranceDays as number ?? 0 })
}

/** The stored form → the plan form's choices (to edit a template). */
export function visitScheduleToForm(schedule: VisitSchedule): VisitScheduleForm {
  const s = parseVisitSchedule(schedule)
  const rhythm = parseRhythm(s.rrule)
  if (rhythm.unit === 'once') return { kind: 'once', from: s.from, to: s.to }
  return { kind: 'every', interval: rhythm.interval, unit: rhythm.unit, from: s.from, to: s.to, toleranceDays: s.toleranceDays }
}

function isMonthStart(md: MonthDay) {
  return monthDayParts(md)[1] === 1
}
function isMonthEnd(md: MonthDay) {
  const [m, d] = monthDayParts(md)
  return d === DAYS_IN_MONTH[m - 1] || (m === 2 && d === 28)
}

export interface VisitWindowWordsOptions {
  /** 'day-month' (default): "15 October"; 'month-day': "October 15". */
  dateOrder?: 'day-month' | 'month-day'
}

function dayWords(md: MonthDay, opts: VisitWindowWordsOptions) {
  const [m, d] = monthDayParts(md)
  return opts.dateOrder === 'month-day' ? `${monthName(m)} ${d}` : `${d} ${monthName(m)}`
}

/**
 * The schedule in plain words for the plan form, e.g. "Every 2 weeks from May to September, give
 * or take 3 days", "Once in April", "Once between 15 October and 15 November", "Every month from
 * December to February, give or take 7 days", "Every 4 weeks all year".
 */
export function describeVisitSchedule(schedule: VisitSchedule, opts: VisitWindowWordsOptions = {}): string {
  const s = parseVisitSchedule(schedule)
  const rhythm = parseRhythm(s.rrule)
  const [fromMonth] = monthDayParts(s.from)
  const [toMonth] = monthDayParts(s.to)
  const wholeMonths = isMonthStart(s.from) && isMonthEnd(s.to)
  const allYear = wholeMonths && (fromMonth === 1 && toMonth === 12)
  const wrapsAllYear = wholeMonths && toMonth === (fromMonth + 10) % 12 + 1
  let season: string
  if (allYear || wrapsAllYear) season = 'all year'
  else if (wholeMonths && fromMonth === toMonth && s.from <= s.to) season = `in ${monthName(fromMonth)}`
  else if (wholeMonths) season = rhythm.unit === 'once' ? `between ${monthName(fromMonth)} and ${monthName(toMonth)}` : `from ${monthName(fromMonth)} to ${monthName(toMonth)}`
  else if (s.from === s.to) season = `on ${dayWords(s.from, opts)}`
  else season = rhythm.unit === 'once' ? `between ${dayWords(s.from, opts)} and ${dayWords(s.to, opts)}` : `from ${dayWords(s.from, opts)} to ${dayWords(s.to, opts)}`

  if (rhythm.unit === 'once') return season === 'all year' ? 'Once a year' : `Once ${season}`
  const every = rhythm.interval === 1 ? `Every ${rhythm.unit}` : `Every ${rhythm.interval} ${rhythm.unit}s`
  const tolerance = s.toleranceDays === 0 ? '' : `, give or take ${s.toleranceDays} day${s.toleranceDays === 1 ? '' : 's'}`
  return `${every} ${season}${tolerance}`
}

function dateIn(year: number, md: MonthDay): LocalDate {
  const [m, d] = monthDayParts(md)
  const leap = (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0
  const day = m === 2 && d === 29 && !leap ? 28 : d
  return `${String(year).padStart(4, '0')}-${md.slice(0, 2)}-${String(day).padStart(2, '0')}`
}

const maxDate = (a: LocalDate, b: LocalDate) => (a > b ? a : b)
const minDate = (a: LocalDate, b: LocalDate) => (a < b ? a : b)

/**
 * The visit windows a schedule gives in a contract term (both ends included), in date order.
 * Each season that touches the term is expanded: the rhythm starts on the season's first day
 * (so a contract signed mid-season keeps the season's rhythm), each occurrence gets ± tolerance,
 * and every window is clipped to the season and to the term; a window left empty is dropped.
 * Once-in-the-season gives one window per season: the season clipped to the term, preferring
 * its middle day.
 */
export function expandVisitSchedule(schedule: VisitSchedule, term: { start: LocalDate, end: LocalDate }): VisitWindow[] {
  const s = parseVisitSchedule(schedule)
  if (!term || typeof term.start !== 'string' || !isLocalDate(term.start)) throw new VisitScheduleError('term.start', 'The term start must be a date as YYYY-MM-DD')
  if (typeof term.end !== 'string' || !isLocalDate(term.end)) throw new VisitScheduleError('term.end', 'The term end must be a date as YYYY-MM-DD')
  if (term.end < term.start) throw new VisitScheduleError('term.end', 'The term ends before it starts')
  const rhythm = parseRhythm(s.rrule)
  const wraps = s.to < s.from
  const windows: VisitWindow[] = []
  const firstYear = Number(term.start.slice(0, 4)) - 1
  const lastYear = Number(term.end.slice(0, 4))
  for (let year = firstYear; year <= lastYear; year++) {
    const seasonStart = dateIn(year, s.from)
    const seasonEnd = dateIn(wraps ? year + 1 : year, s.to)
    if (seasonEnd < term.start || seasonStart > term.end) continue
    const lo = maxDate(seasonStart, term.start)
    const hi = minDate(seasonEnd, term.end)
    if (rhythm.unit === 'once') {
      const span = Math.round((Date.parse(hi) - Date.parse(lo)) / 86_400_000)
      windows.push({ key: seasonStart, earliest: lo, latest: hi, preferred: addDays(lo, Math.floor(span / 2)) })
      continue
    }
    for (const occurrence of expandVisitRule(s.rrule, seasonStart, seasonEnd)) {
      const earliest = maxDate(addDays(occurrence, -s.toleranceDays), lo)
      const latest = minDate(addDays(occurrence, s.toleranceDays), hi)
      if (earliest > latest) continue
      windows.push({ key: occurrence, earliest, latest, preferred: minDate(maxDate(occurrence, earliest), latest) })
    }
  }
  return windows
}
