import { boolean, date, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { VISIT_STATUSES, type ChecklistItem } from '../../../shared/types/schedule'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { contracts } from './contracts'
import { customers } from './customers'
import { planVisitTemplates, visitType } from './plans'
import { sites } from './sites'
import { users } from './users'

export const visitStatus = pgEnum('visit_status', VISIT_STATUSES)

/** One visit to a site: generated from a contract's plan, or added by hand. */
export const visits = pgTable('visits', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  contractId: uuid('contract_id').references(() => contracts.id, { onDelete: 'set null' }),
  templateId: uuid('template_id').references(() => planVisitTemplates.id, { onDelete: 'set null' }),
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'restrict' }),
  siteId: uuid('site_id').notNull().references(() => sites.id, { onDelete: 'restrict' }),
  visitType: visitType('visit_type').notNull(),
  status: visitStatus('status').notNull().default('scheduled'),
  /** Company-local date of the visit, and its planned start as an instant. */
  scheduledOn: date('scheduled_on').notNull(),
  startsAt: timestamp('starts_at', { withTimezone: true }).notNull(),
  durationMinutes: integer('duration_minutes').notNull(),
  technicianId: uuid('technician_id').references(() => users.id, { onDelete: 'set null' }),
  /** Set when someone moved the visit: regeneration then leaves it alone. */
  movedManually: boolean('moved_manually').notNull().default(false),
  moveReason: text('move_reason').notNull().default(''),
  /** A technician's own order for the day, overriding the computed one. */
  routePosition: integer('route_position'),
  /** `templateId:originalDate` for generated visits: regeneration matches on it, nothing is duplicated. */
  generationKey: text('generation_key'),
  checklist: jsonb('checklist').$type<ChecklistItem[]>().notNull().default([]),
  startedAt: timestamp('started_at', { withTimezone: true }),
  finishedAt: timestamp('finished_at', { withTimezone: true }),
  statusReason: text('status_reason').notNull().default(''),
  /** Why the planner found no day and technician for this visit (it then waits, unassigned, on its preferred day); null when placed. */
  unplacedReason: text('unplaced_reason'),
  /** Shown in the visit report. */
  customerNotes: text('customer_notes').notNull().default(''),
  /** Staff only. */
  internalNotes: text('internal_notes').notNull().default(''),
  /** Bumped on every change, for the iCalendar SEQUENCE. */
  sequence: integer('sequence').notNull().default(0),
  ...timestamps,
}, t => [
  uniqueIndex('visits_contract_generation_key').on(t.contractId, t.generationKey),
  index('visits_company_date_idx').on(t.companyId, t.scheduledOn),
  index('visits_technician_date_idx').on(t.technicianId, t.scheduledOn),
  index('visits_customer_date_idx').on(t.customerId, t.scheduledOn),
  // A feature's chart marks the finished visits at its site (chart-data featureSeries).
  index('visits_site_date_idx').on(t.siteId, t.scheduledOn),
])

/** Private, revocable iCalendar feeds: for a technician (their visits) or a customer (their upcoming visits). */
export const calendarFeeds = pgTable('calendar_feeds', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  userId: uuid('user_id').references(() => users.id, { onDelete: 'cascade' }),
  customerId: uuid('customer_id').references(() => customers.id, { onDelete: 'cascade' }),
  tokenHash: text('token_hash').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  revokedAt: timestamp('revoked_at', { withTimezone: true }),
}, t => [uniqueIndex('calendar_feeds_token_key').on(t.tokenHash)])
