import { z } from 'zod'

/** True when the runtime knows this IANA time zone. */
export function isTimeZone(tz: string) {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz })
    return true
  }
  catch {
    return false
  }
}

/** True when `code` is an ISO 4217 currency the runtime can format. */
export function isCurrency(code: string) {
  const supported = (Intl as unknown as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.('currency')
  return supported ? supported.includes(code) : /^[A-Z]{3}$/.test(code)
}

export const companyUpdateSchema = z.object({
  name: z.string().trim().min(1, 'Enter the company name').max(120),
  currency: z.string().trim().toUpperCase().refine(isCurrency, 'Use an ISO 4217 currency code, e.g. USD'),
  /** Percent with up to two decimals, stored as basis points. */
  taxRateBasisPoints: z.number().int('Use whole basis points').min(0).max(5000, 'Tax above 50 % is not plausible'),
  unitSystem: z.enum(['us', 'metric'], 'Choose US or metric units'),
  timeZone: z.string().trim().refine(isTimeZone, 'Use an IANA time zone, e.g. America/Chicago'),
  /** ISO weekdays worked, 1 = Monday … 7 = Sunday. */
  workingDays: z.array(z.number().int().min(1).max(7)).min(1, 'Work at least one day a week').max(7).transform(d => [...new Set(d)].sort()),
  dayStartTime: z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a time like 08:00'),
  baseLatitude: z.number().min(-90).max(90).nullable(),
  baseLongitude: z.number().min(-180).max(180).nullable(),
  /** Printed on invoices, one line per line. */
  address: z.string().trim().max(400, 'Use at most 400 characters'),
  billingEmail: z.union([z.literal(''), z.email('Use an e-mail address like billing@example.com')]),
  paymentTermsDays: z.number('Payment terms are a number of days').int('Use whole days').min(0, 'At least 0 days (due on receipt)').max(120, 'At most 120 days'),
}).partial().refine(v => Object.keys(v).length > 0, { message: 'Nothing to change', path: ['_'] })
export type CompanyUpdateInput = z.output<typeof companyUpdateSchema>

export const closedDaysSchema = z.object({
  days: z.array(z.object({
    day: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-12-25'),
    reason: z.string().trim().max(120).default(''),
  })).max(200, 'At most 200 closed days'),
})
export type ClosedDaysInput = z.output<typeof closedDaysSchema>
