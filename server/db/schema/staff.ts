import { date, doublePrecision, integer, pgTable, primaryKey, text, uuid } from 'drizzle-orm/pg-core'
import { timestamps } from './columns'
import { companies } from './companies'
import { users } from './users'

/** Scheduling facts about a staff member: minutes of work a day and the home base routes start from. */
export const staffProfiles = pgTable('staff_profiles', {
  userId: uuid('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  capacityMinutes: integer('capacity_minutes').notNull().default(420),
  homeLatitude: doublePrecision('home_latitude'),
  homeLongitude: doublePrecision('home_longitude'),
  ...timestamps,
})

/** Days the company does not work (holidays, closures): generated visits move off them. */
export const closedDays = pgTable('closed_days', {
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  day: date('day').notNull(),
  reason: text('reason').notNull().default(''),
}, t => [primaryKey({ columns: [t.companyId, t.day] })])
