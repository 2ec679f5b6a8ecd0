import { char, doublePrecision, integer, pgEnum, pgTable, smallint, text } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'

export const unitSystem = pgEnum('unit_system', ['us', 'metric'])

/** The care company and its settings. */
export const companies = pgTable('companies', {
  id: id(),
  name: text('name').notNull(),
  /** ISO 4217 alphabetic code, e.g. USD. */
  currency: char('currency', { length: 3 }).notNull().default('USD'),
  /** Sales tax in basis points (825 = 8.25 %), so no floating point reaches money. */
  taxRateBasisPoints: integer('tax_rate_bp').notNull().default(0),
  unitSystem: unitSystem('unit_system').notNull().default('us'),
  /** IANA time zone name, e.g. America/Chicago. */
  timeZone: text('time_zone').notNull().default('UTC'),
  /** ISO weekdays the company works (1 = Monday … 7 = Sunday). */
  workingDays: smallint('working_days').array().notNull().default([1, 2, 3, 4, 5]),
  /** Local time the working day starts, HH:MM; generated visits start then. */
  dayStartTime: text('day_start_time').notNull().default('08:00'),
  /** The yard routes start from when a technician has no home base of their own. */
  baseLatitude: doublePrecision('base_latitude'),
  baseLongitude: doublePrecision('base_longitude'),
  /** Printed on invoices. */
  address: text('address').notNull().default(''),
  /** The number customers are told to call, as the company writes it; empty for none. */
  phone: text('phone').notNull().default(''),
  billingEmail: text('billing_email').notNull().default(''),
  /** Invoices fall due this many days after they are issued. */
  paymentTermsDays: smallint('payment_terms_days').notNull().default(30),
  ...timestamps,
})
