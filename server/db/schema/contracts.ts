import { boolean, char, date, index, integer, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid, type AnyPgColumn } from 'drizzle-orm/pg-core'
import { CONTRACT_STATUSES } from '../../../shared/types/schedule'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { customers } from './customers'
import { waterFeatures } from './features'
import { plans } from './plans'

export const contractStatus = pgEnum('contract_status', CONTRACT_STATUSES)

/** A customer's contract for one term of a plan, covering one or more of their features. */
export const contracts = pgTable('contracts', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'restrict' }),
  planId: uuid('plan_id').notNull().references(() => plans.id, { onDelete: 'restrict' }),
  status: contractStatus('status').notNull().default('draft'),
  /** First and last day of the term, company-local dates. */
  termStart: date('term_start').notNull(),
  termEnd: date('term_end').notNull(),
  priceOverrideMinor: integer('price_override_minor'),
  currency: char('currency', { length: 3 }).notNull(),
  autoRenew: boolean('auto_renew').notNull(),
  /** The contract this one renews. */
  previousContractId: uuid('previous_contract_id').references((): AnyPgColumn => contracts.id, { onDelete: 'set null' }),
  notes: text('notes').notNull().default(''),
  activatedAt: timestamp('activated_at', { withTimezone: true }),
  endedAt: timestamp('ended_at', { withTimezone: true }),
  statusReason: text('status_reason').notNull().default(''),
  ...timestamps,
}, t => [
  index('contracts_company_status_idx').on(t.companyId, t.status),
  index('contracts_customer_idx').on(t.customerId),
  index('contracts_term_end_idx').on(t.companyId, t.termEnd),
  // A term is renewed once.
  uniqueIndex('contracts_previous_key').on(t.previousContractId),
])

export const contractFeatures = pgTable('contract_features', {
  contractId: uuid('contract_id').notNull().references(() => contracts.id, { onDelete: 'cascade' }),
  featureId: uuid('feature_id').notNull().references(() => waterFeatures.id, { onDelete: 'restrict' }),
  position: integer('position').notNull().default(0),
}, t => [primaryKey({ columns: [t.contractId, t.featureId] })])
