import { boolean, char, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { BILLING_CADENCES, VISIT_TYPES, type ChecklistItem } from '../../../shared/types/schedule'
import { id, timestamps } from './columns'
import { companies } from './companies'

export const billingCadence = pgEnum('billing_cadence', BILLING_CADENCES)
export const visitType = pgEnum('visit_type', VISIT_TYPES)

/** A service plan the company sells. */
export const plans = pgTable('plans', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
  /** Price per term in minor units of `currency` (cents for USD). */
  priceMinor: integer('price_minor').notNull(),
  currency: char('currency', { length: 3 }).notNull(),
  billingCadence: billingCadence('billing_cadence').notNull(),
  termMonths: integer('term_months').notNull().default(12),
  autoRenewDefault: boolean('auto_renew_default').notNull().default(true),
  archivedAt: timestamp('archived_at', { withTimezone: true }),
  ...timestamps,
}, t => [index('plans_company_idx').on(t.companyId)])

/** The visits a plan includes: a type, a window in the season (rhythm, season, tolerance; see visit-windows.ts), a duration and a checklist. */
export const planVisitTemplates = pgTable('plan_visit_templates', {
  id: id(),
  planId: uuid('plan_id').notNull().references(() => plans.id, { onDelete: 'cascade' }),
  position: integer('position').notNull().default(0),
  visitType: visitType('visit_type').notNull(),
  /** The rhythm: an RRULE body with FREQ and INTERVAL only, e.g. FREQ=WEEKLY;INTERVAL=2; FREQ=YEARLY = once in the season. */
  rrule: text('rrule').notNull(),
  /** The season's first day, 'MM-DD'. */
  seasonFrom: text('season_from').notNull().default('01-01'),
  /** The season's last day, 'MM-DD' (earlier than season_from when it wraps the new year). */
  seasonTo: text('season_to').notNull().default('12-31'),
  /** Days either side of each occurrence the visit may move. */
  toleranceDays: integer('tolerance_days').notNull().default(0),
  durationMinutes: integer('duration_minutes').notNull(),
  checklist: jsonb('checklist').$type<ChecklistItem[]>().notNull().default([]),
  ...timestamps,
}, t => [index('plan_visit_templates_plan_idx').on(t.planId, t.position)])
