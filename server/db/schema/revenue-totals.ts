import { bigint, date, index, integer, pgTable, text, unique, uuid } from 'drizzle-orm/pg-core'
import { invoiceStatus } from './billing'
import { companies } from './companies'
import { contracts } from './contracts'

// Totals the revenue view and the invoices table read instead of every row. They are never
// written by the app: PostgreSQL triggers keep them exact in the same transaction as every
// write to the rows they add up (drizzle/*revenue-totals-triggers.sql), so a new writer cannot
// forget them, and the migration that made them back-filled them.

/**
 * What a company's invoices add up to, per currency, state, contract plan, issue day and due
 * day: the revenue view's receivables and invoiced figures and the invoices table's count and
 * sums read these few hundred rows instead of every invoice. Whole days, not months, so a
 * figure "as of" any date is exact.
 */
export const invoiceDayTotals = pgTable('invoice_day_totals', {
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  currency: text('currency').notNull(),
  status: invoiceStatus('status').notNull(),
  /** The plan of the invoice's contract; null for an invoice without a contract. */
  planId: uuid('plan_id'),
  issueDate: date('issue_date'),
  dueDate: date('due_date'),
  invoices: integer('invoices').notNull(),
  subtotalMinor: bigint('subtotal_minor', { mode: 'number' }).notNull(),
  totalMinor: bigint('total_minor', { mode: 'number' }).notNull(),
  amountPaidMinor: bigint('amount_paid_minor', { mode: 'number' }).notNull(),
}, t => [
  unique('invoice_day_totals_key').on(t.companyId, t.currency, t.status, t.planId, t.issueDate, t.dueDate).nullsNotDistinct(),
  index('invoice_day_totals_company_status_due_idx').on(t.companyId, t.status, t.dueDate),
])

/** A contract's visits that are not cancelled: a per-visit plan's monthly value counts them. */
export const contractPlannedVisits = pgTable('contract_planned_visits', {
  contractId: uuid('contract_id').primaryKey().references(() => contracts.id, { onDelete: 'cascade' }),
  visits: integer('visits').notNull(),
})
