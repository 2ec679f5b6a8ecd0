import { bigint, doublePrecision, index, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { sql } from 'drizzle-orm'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { contracts } from './contracts'
import { waterFeatures } from './features'
import { users } from './users'
import { visits } from './visits'

export const alertSeverity = pgEnum('alert_severity', ['watch', 'act'])
export const alertStatus = pgEnum('alert_status', ['open', 'acknowledged', 'resolved'])

/**
 * Something that needs a person: a reading out of range, a trend, water loss, an overdue visit,
 * equipment due, a contract ending. One open alert per subject (`subjectKey`); a repeat updates it.
 */
export const alerts = pgTable('alerts', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  /** e.g. reading:<featureId>:pH, trend:<featureId>:ph_drop, visit:<visitId>:overdue */
  subjectKey: text('subject_key').notNull(),
  condition: text('condition').notNull(),
  severity: alertSeverity('severity').notNull(),
  status: alertStatus('status').notNull().default('open'),
  featureId: uuid('feature_id').references(() => waterFeatures.id, { onDelete: 'cascade' }),
  visitId: uuid('visit_id').references(() => visits.id, { onDelete: 'set null' }),
  contractId: uuid('contract_id').references(() => contracts.id, { onDelete: 'set null' }),
  title: text('title').notNull(),
  detail: text('detail').notNull().default(''),
  value: doublePrecision('value'),
  firstSeenAt: timestamp('first_seen_at', { withTimezone: true }).notNull().defaultNow(),
  lastSeenAt: timestamp('last_seen_at', { withTimezone: true }).notNull().defaultNow(),
  closedAt: timestamp('closed_at', { withTimezone: true }),
  closedBy: uuid('closed_by').references(() => users.id, { onDelete: 'set null' }),
  note: text('note').notNull().default(''),
  notifiedAt: timestamp('notified_at', { withTimezone: true }),
  /** The retest visit the owner booked from this alert (booking again returns it). */
  retestVisitId: uuid('retest_visit_id').references(() => visits.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [
  uniqueIndex('alerts_one_open_per_subject').on(t.companyId, t.subjectKey).where(sql`status <> 'resolved'`),
  index('alerts_company_status_idx').on(t.companyId, t.status, t.severity),
  index('alerts_feature_idx').on(t.featureId),
])

/** Where a scheduled task got to (e.g. the last reading seq the alert scan has seen). */
export const taskWatermarks = pgTable('task_watermarks', {
  name: text('name').primaryKey(),
  lastSeq: bigint('last_seq', { mode: 'number' }).notNull().default(0),
  lastRunAt: timestamp('last_run_at', { withTimezone: true }),
})
