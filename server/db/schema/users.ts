import { boolean, index, integer, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { ROLES } from '../../../shared/utils/roles'
import { id, timestamps } from './columns'
import { companies, unitSystem } from './companies'
import { customers } from './customers'

export const userRole = pgEnum('user_role', ROLES)

export const users = pgTable('users', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  /** Stored lower-case; unique across the product. */
  email: text('email').notNull(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  role: userRole('role').notNull(),
  active: boolean('active').notNull().default(true),
  /** Set for customer-role users: the customer whose records they may see. */
  customerId: uuid('customer_id').references(() => customers.id, { onDelete: 'set null' }),
  failedSignIns: integer('failed_sign_ins').notNull().default(0),
  lockedUntil: timestamp('locked_until', { withTimezone: true }),
  passwordChangedAt: timestamp('password_changed_at', { withTimezone: true }).notNull().defaultNow(),
  lastSignInAt: timestamp('last_sign_in_at', { withTimezone: true }),
  /** The units this person reads in; null follows the company's. */
  unitSystem: unitSystem('unit_system'),
  ...timestamps,
}, t => [
  uniqueIndex('users_email_key').on(t.email),
  index('users_company_role_idx').on(t.companyId, t.role),
])

/** Server-side sessions: the browser holds an opaque token, the table holds its SHA-256. */
export const sessions = pgTable('sessions', {
  id: id(),
  tokenHash: text('token_hash').notNull(),
  userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  revokedAt: timestamp('revoked_at', { withTimezone: true }),
  ip: text('ip'),
  userAgent: text('user_agent'),
}, t => [
  uniqueIndex('sessions_token_hash_key').on(t.tokenHash),
  index('sessions_user_idx').on(t.userId),
])
