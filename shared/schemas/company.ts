import { z } from 'zod'
import { decimal, localDate, text, updateSchema, wholeNumber } from './fields'

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

/** The company's settings; a PATCH changes exactly the fields sent. */
export const companyUpdateSchema = updateSchema({
  name: text(120, 'Enter the company name'),
  currency: text(10).toUpperCase().refine(isCurrency, 'Use an ISO 4217 currency code, e.g. USD'),
  /** Percent with up to two decimals, stored as basis points. */
  taxRateBasisPoints: wholeNumber('Tax rate', 0, 5000, { min: 'Tax cannot be negative', max: 'Tax above 50 % is not plausible' }),
  unitSystem: z.enum(['us', 'metric'], 'Choose US or metric units'),
  timeZone: text(64).refine(isTimeZone, 'Use an IANA time zone, e.g. America/Chicago'),
  /** ISO weekdays worked, 1 = Monday … 7 = Sunday. */
  workingDays: z.array(wholeNumber('A working day', 1, 7, { min: 'Use 1 (Monday) to 7 (Sunday)', max: 'Use 1 (Monday) to 7 (Sunday)' }))
    .min(1, 'Work at least one day a week').max(7).transform(d => [...new Set(d)].sort()),
  dayStartTime: z.string('Use a time like 08:00').regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a time like 08:00'),
  baseLatitude: decimal('Latitude', -90, 90).nullable(),
  baseLongitude: decimal('Longitude', -180, 180).nullable(),
  /** Printed on invoices, one line per line. */
  address: text(400),
  billingEmail: z.union([z.literal(''), z.email('Use an e-mail address like billing@example.com').max(254, 'Use at most 254 characters')]),
  paymentTermsDays: wholeNumber('Payment terms', 0, 120, { min: 'At least 0 days (due on receipt)', max: 'At most 120 days' }),
})
export type CompanyUpdateInput = z.output<typeof companyUpdateSchema>

export const closedDaysSchema = z.object({
  days: z.array(z.object({
    day: localDate,
    reason: text(120).default(''),
  })).max(200, 'At most 200 closed days'),
})
export type ClosedDaysInput = z.output<typeof closedDaysSchema>
