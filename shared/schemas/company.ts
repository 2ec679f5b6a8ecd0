import { z } from 'zod'
import { decimal, localDate, text, updateSchema, wholeNumber, workingWeekdays } from './fields'

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

/** Characters a phone number may be written with, however the company likes to write it. */
const PHONE_CHARS = /^[\d\s+\-().]*$/

/**
 * The number customers are told to call: digits with spaces, "+", "-", parentheses and dots as
 * people write them ("(555) 014-2290", "+44 20 7946 0018"); empty for none. 7 to 15 digits (E.164
 * allows at most 15), at most 30 characters.
 */
export const phoneNumber = text(30).refine(s => PHONE_CHARS.test(s), 'Use digits, spaces, +, -, dots and parentheses only, e.g. (555) 014-2290')
  .refine((s) => {
    const digits = s.replace(/\D/g, '').length
    return s === '' || (digits >= 7 && digits <= 15)
  }, 'A phone number has 7 to 15 digits, e.g. (555) 014-2290')

/** The company's settings; a PATCH changes exactly the fields sent. */
export const companyUpdateSchema = updateSchema({
  name: text(120, 'Enter the company name'),
  currency: text(10).toUpperCase().refine(isCurrency, 'Use an ISO 4217 currency code, e.g. USD'),
  /** Percent with up to two decimals, stored as basis points. */
  taxRateBasisPoints: wholeNumber('Tax rate', 0, 5000, { min: 'Tax cannot be negative', max: 'Tax above 50 % is not plausible' }),
  unitSystem: z.enum(['us', 'metric'], 'Choose US or metric units'),
  timeZone: text(64).refine(isTimeZone, 'Use an IANA time zone, e.g. America/Chicago'),
  /** ISO weekdays worked, 1 = Monday … 7 = Sunday. */
  workingDays: workingWeekdays,
  dayStartTime: z.string('Use a time like 08:00').regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a time like 08:00'),
  baseLatitude: decimal('Latitude', -90, 90).nullable(),
  baseLongitude: decimal('Longitude', -180, 180).nullable(),
  /** Printed on invoices, one line per line. */
  address: text(400),
  /** Shown wherever a customer is told to call; empty when the company gives none. */
  phone: phoneNumber,
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
