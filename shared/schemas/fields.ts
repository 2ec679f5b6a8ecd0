import { z } from 'zod'

// The one input gate: every schema builds its text, dates, times, money and counts from these,
// so what reaches the database is something its columns can hold, and a refusal is a 400 that
// names the field in plain words (never a 500 from PostgreSQL or from JavaScript's Date).

/** The largest value of a PostgreSQL `integer` column (money in minor units, counts). */
export const PG_INT_MAX = 2_147_483_647
/** The most a money column (`integer`, minor units) holds: about 21 million in a two-decimal currency. */
export const MONEY_MAX_MINOR = PG_INT_MAX

export const DATE_MIN_YEAR = 1900
export const DATE_MAX_YEAR = 2200

const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/

/** True when PostgreSQL can store the string in `text` and `jsonb` (no NUL, no lone UTF-16 surrogate). */
export function isStorableText(s: string): boolean {
  return !s.includes('\u0000') && !LONE_SURROGATE.test(s)
}

/** A string without the characters PostgreSQL refuses; not trimmed (passwords, rules). */
export function safeString(what = 'This field') {
  return z.string(`${what} must be text`)
    .refine(s => !s.includes('\u0000'), 'Remove the invisible NUL character (\\u0000): it cannot be stored')
    .refine(s => !LONE_SURROGATE.test(s), 'This text has a broken character (half of an emoji or symbol); type it again')
}

/**
 * Trimmed text of at most `max` characters without NUL or broken characters. With `required`
 * (the message to show) it must not be empty; otherwise empty is allowed.
 */
export function text(max: number, required?: string) {
  const s = safeString().trim().max(max, `Use at most ${max.toLocaleString('en-US')} characters`)
  return required ? s.min(1, required) : s
}

/** The free-text search box of a list (`q`). */
export const searchText = text(100).optional()

function dateParts(s: string) {
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(s)
  return m ? { y: Number(m[1]), m: Number(m[2]), d: Number(m[3]) } : null
}

/** True for a calendar date that exists (2028-02-29 yes, 2026-02-30 and 2026-13-01 no). */
export function isRealDate(s: string): boolean {
  const p = dateParts(s)
  if (!p || p.m < 1 || p.m > 12 || p.d < 1) return false
  const days = new Date(Date.UTC(2000, p.m, 0)).getUTCDate() // days in that month of a leap year
  if (p.d > days) return false
  if (p.m === 2 && p.d === 29) return (p.y % 4 === 0 && p.y % 100 !== 0) || p.y % 400 === 0
  return true
}

function inYearRange(s: string) {
  const p = dateParts(s)
  return !!p && p.y >= DATE_MIN_YEAR && p.y <= DATE_MAX_YEAR
}

/** A calendar date `YYYY-MM-DD` that exists, between 1900 and 2200. */
export const localDate = z.string('Use a date like 2026-04-01')
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-04-01')
  .refine(s => !dateParts(s) || isRealDate(s), 'There is no such date: check the day and the month')
  .refine(s => !isRealDate(s) || inYearRange(s), `Use a date between ${DATE_MIN_YEAR} and ${DATE_MAX_YEAR}`)

/** An ISO date and time with an offset (`2026-04-01T09:30:00Z`), on a real date between 1900 and 2200. */
export const timestamp = z.iso.datetime({ offset: true, message: 'Use an ISO date and time, e.g. 2026-04-01T09:30:00Z' })
  .refine(s => isRealDate(s) && inYearRange(s) && Number.isFinite(Date.parse(s)), `Use a real date and time between ${DATE_MIN_YEAR} and ${DATE_MAX_YEAR}`)

/** Money in whole minor units (cents), bounded by `max` and by what the column holds. */
export function moneyMinor(what: string, opts: { min?: number, max?: number } = {}) {
  const min = opts.min ?? 0
  const max = Math.min(opts.max ?? MONEY_MAX_MINOR, MONEY_MAX_MINOR)
  return z.number(`${what} is a number`).int(`${what} is in whole cents`)
    .min(min, min === 0 ? `${what} cannot be negative` : `${what} is too low`)
    .max(max, `${what} is too large`)
}

/** A whole number between `min` and `max` (inclusive), for counts, minutes and days. */
export function wholeNumber(what: string, min: number, max: number, messages: { min?: string, max?: string } = {}) {
  return z.number(`${what} is a number`).int(`${what} is a whole number`)
    .min(min, messages.min ?? `${what} is at least ${min.toLocaleString('en-US')}`)
    .max(Math.min(max, PG_INT_MAX), messages.max ?? `${what} is at most ${max.toLocaleString('en-US')}`)
}

/** ISO weekdays worked, 1 = Monday … 7 = Sunday: at least one, each once, in order. */
export const workingWeekdays = z.array(wholeNumber('A working day', 1, 7, { min: 'Use 1 (Monday) to 7 (Sunday)', max: 'Use 1 (Monday) to 7 (Sunday)' }), 'Working days are a list of weekdays')
  .min(1, 'Work at least one day a week').max(7, 'A week has seven days').transform(d => [...new Set(d)].sort())

/** A finite number between `min` and `max` (measurements, stored as double precision). */
export function decimal(what: string, min: number, max: number, messages: { min?: string, max?: string } = {}) {
  return z.number(`${what} is a number`)
    .min(min, messages.min ?? `${what} is at least ${min.toLocaleString('en-US')}`)
    .max(max, messages.max ?? `${what} is at most ${max.toLocaleString('en-US')}`)
}

/** Query-string page numbers: bounded so an offset never leaves PostgreSQL's range. */
export const pageNumber = z.coerce.number('Page is a number').int('Page is a whole number').min(1, 'Pages start at 1').max(100_000, 'Page is at most 100,000')

// ---- Create and update schemas from one list of fields --------------------------------------

type Shape = Record<string, z.ZodType>
type Defaults<S extends Shape> = { [K in keyof S]?: z.output<S[K]> }
type WithDefaults<S extends Shape, D> = { [K in keyof S]: K extends keyof D ? z.ZodDefault<S[K]> : S[K] }
type AllOptional<S extends Shape> = { [K in keyof S]: z.ZodOptional<S[K]> }

/**
 * The create schema of a resource: its fields, with `defaults` for those that may be left out.
 * Defaults live here only, never on the fields, so the update schema cannot invent values.
 */
export function createSchema<S extends Shape, D extends Defaults<S>>(fields: S, defaults: D) {
  const shape: Record<string, z.ZodType> = {}
  for (const [key, field] of Object.entries(fields)) {
    if (key in defaults) {
      const value = (defaults as Record<string, unknown>)[key]
      shape[key] = (field as z.ZodType<unknown>).default(() => structuredClone(value))
    }
    else {
      shape[key] = field
    }
  }
  return z.object(shape as WithDefaults<S, D>)
}

/** The body of a PATCH that changed nothing. */
export const NOTHING_TO_CHANGE = 'Nothing to change: send at least one field'

/**
 * The update schema of a resource: any of its fields (none has a default, so a field left out
 * stays as it is), plus `extra` fields (e.g. `archived`), at least one present.
 */
export function updateSchema<S extends Shape, E extends Shape = Record<never, never>>(fields: S, extra?: E) {
  const shape: Record<string, z.ZodType> = {}
  for (const [key, field] of Object.entries({ ...fields, ...extra })) shape[key] = field.optional()
  return z.object(shape as AllOptional<Omit<S, keyof E> & E>)
    .refine(v => Object.values(v).some(x => x !== undefined), { path: ['_'], message: NOTHING_TO_CHANGE })
}
