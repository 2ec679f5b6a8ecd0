import { bigint, index, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { companies } from './companies'
import { users } from './users'

/** Append-only record of sign-ins, lockouts, role and account changes. */
export const auditLog = pgTable('audit_log', {
  id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
  companyId: uuid('company_id').references(() => companies.id, { onDelete: 'cascade' }),
  actorUserId: uuid('actor_user_id').references(() => users.id, { onDelete: 'set null' }),
  /** e.g. sign_in.success, sign_in.failure, sign_in.locked, user.created, user.role_changed */
  action: text('action').notNull(),
  subjectType: text('subject_type'),
  subjectId: text('subject_id'),
  detail: jsonb('detail').$type<Record<string, unknown>>().notNull().default({}),
  ip: text('ip'),
}, t => [
  index('audit_log_action_at_idx').on(t.action, t.at),
  index('audit_log_subject_idx').on(t.subjectType, t.subjectId),
])

/** Failed sign-ins by address, for the per-address rate limit. */
export const signInFailures = pgTable('sign_in_failures', {
  id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
  ip: text('ip').notNull(),
  email: text('email').notNull(),
}, t => [
  index('sign_in_failures_ip_at_idx').on(t.ip, t.at),
])
