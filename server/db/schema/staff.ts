import { check, date, doublePrecision, index, integer, pgTable, primaryKey, smallint, text, uuid } from 'drizzle-orm/pg-core'
import { sql } from 'drizzle-orm'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { users } from './users'

/**
 * Scheduling facts about a staff member: minutes of work a day, the home base routes start from
 * and their own working weekdays (1 Monday … 7 Sunday; null: the company's working days).
 */
export const staffProfiles = pgTable('staff_profiles', {
  userId: uuid('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  capacityMinutes: integer('capacity_minutes').notNull().default(420),
  homeLatitude: doublePrecision('home_latitude'),
  homeLongitude: doublePrecision('home_longitude'),
  workingDays: smallint('working_days').array(),
  ...timestamps,
})

/** A technician's dated days off (holiday, training, sick): one day or a from–to range, both days included. */
export const technicianDaysOff = pgTable('technician_days_off', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  fromDay: date('from_day').notNull(),
  toDay: date('to_day').notNull(),
  reason: text('reason').notNull(),
  ...timestamps,
}, t => [
  index('technician_days_off_user_idx').on(t.userId, t.fromDay),
  check('technician_days_off_range', sql`${t.toDay} >= ${t.fromDay}`),
])

/** Days the company does not work (holidays, closures): generated visits move off them. */
export const closedDays = pgTable('closed_days', {
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  day: date('day').notNull(),
  reason: text('reason').notNull().default(''),
}, t => [primaryKey({ columns: [t.companyId, t.day] })])
