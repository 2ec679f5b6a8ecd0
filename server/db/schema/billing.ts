import { bigint, boolean, char, date, index, integer, jsonb, numeric, pgEnum, pgTable, primaryKey, smallint, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { INVOICE_SOURCES, INVOICE_STATUSES, LINE_KINDS, type PaymentMismatch } from '../../../shared/types/billing'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { contracts } from './contracts'
import { customers } from './customers'
import { visits } from './visits'

export const invoiceStatus = pgEnum('invoice_status', INVOICE_STATUSES)
export const invoiceSource = pgEnum('invoice_source', INVOICE_SOURCES)
export const invoiceLineKind = pgEnum('invoice_line_kind', LINE_KINDS)

/**
 * An invoice. Money in integer minor units of `currency`. `billingKey` is unique per company: one
 * invoice per contract term (`term:<contract>`), contract month (`month:<contract>:<YYYY-MM-DD>`)
 * or finished visit (`visit:<visit>`), so raising the same one twice is impossible. `number` is
 * given at issuing from `invoice_counters`, gapless per company and year.
 */
export const invoices = pgTable('invoices', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'restrict' }),
  contractId: uuid('contract_id').references(() => contracts.id, { onDelete: 'set null' }),
  visitId: uuid('visit_id').references(() => visits.id, { onDelete: 'set null' }),
  source: invoiceSource('source').notNull(),
  billingKey: text('billing_key'),
  status: invoiceStatus('status').notNull().default('preparing'),
  number: text('number'),
  numberYear: smallint('number_year'),
  numberSeq: integer('number_seq'),
  currency: char('currency', { length: 3 }).notNull(),
  /** Snapshot of the company's rate when the invoice was made (basis points: 725 = 7.25 %). */
  taxRateBasisPoints: integer('tax_rate_bp').notNull(),
  subtotalMinor: integer('subtotal_minor').notNull().default(0),
  taxMinor: integer('tax_minor').notNull().default(0),
  totalMinor: integer('total_minor').notNull().default(0),
  amountPaidMinor: integer('amount_paid_minor').notNull().default(0),
  /** Company-local dates. */
  issueDate: date('issue_date'),
  dueDate: date('due_date'),
  periodStart: date('period_start'),
  periodEnd: date('period_end'),
  notes: text('notes').notNull().default(''),
  finalizedAt: timestamp('finalized_at', { withTimezone: true }),
  sentAt: timestamp('sent_at', { withTimezone: true }),
  paidAt: timestamp('paid_at', { withTimezone: true }),
  cancelledAt: timestamp('cancelled_at', { withTimezone: true }),
  writtenOffAt: timestamp('written_off_at', { withTimezone: true }),
  paymentMethod: text('payment_method'),
  paymentReference: text('payment_reference').notNull().default(''),
  /** The provider's last word on a failed payment attempt. */
  lastPaymentError: text('last_payment_error'),
  /** The last online payment whose amount did not match what was due (the invoice stayed due). */
  paymentMismatch: jsonb('payment_mismatch').$type<PaymentMismatch>(),
  /** Overdue reminders sent so far: 0, then 1 (7 days), 2 (14 days), 3 (30 days). */
  reminderStage: smallint('reminder_stage').notNull().default(0),
  /** The provider's copy: set once created there; `providerSyncedAt` once it is issued there. */
  providerInvoiceId: text('provider_invoice_id'),
  providerHostedUrl: text('provider_hosted_url'),
  providerSyncedAt: timestamp('provider_synced_at', { withTimezone: true }),
  providerError: text('provider_error'),
  ...timestamps,
}, t => [
  uniqueIndex('invoices_billing_key').on(t.companyId, t.billingKey),
  uniqueIndex('invoices_number_key').on(t.companyId, t.number),
  uniqueIndex('invoices_provider_key').on(t.providerInvoiceId),
  index('invoices_company_status_due_idx').on(t.companyId, t.status, t.dueDate),
  // The invoices table's sorts, with its tie-break (number, then id), so a page reads only its rows.
  index('invoices_company_issue_idx').on(t.companyId, t.issueDate, t.numberYear, t.numberSeq, t.id),
  index('invoices_company_due_idx').on(t.companyId, t.dueDate, t.numberYear, t.numberSeq, t.id),
  index('invoices_company_total_idx').on(t.companyId, t.totalMinor, t.numberYear, t.numberSeq, t.id),
  index('invoices_customer_idx').on(t.customerId),
  index('invoices_contract_idx').on(t.contractId),
])

/** One line of an invoice. `amountMinor` = quantity × unit price, rounded half away from zero. */
export const invoiceLines = pgTable('invoice_lines', {
  id: id(),
  invoiceId: uuid('invoice_id').notNull().references(() => invoices.id, { onDelete: 'cascade' }),
  position: integer('position').notNull().default(0),
  kind: invoiceLineKind('kind').notNull(),
  description: text('description').notNull(),
  quantity: numeric('quantity', { precision: 10, scale: 2, mode: 'number' }).notNull(),
  unitPriceMinor: integer('unit_price_minor').notNull(),
  amountMinor: integer('amount_minor').notNull(),
  taxable: boolean('taxable').notNull().default(true),
  ...timestamps,
}, t => [index('invoice_lines_invoice_idx').on(t.invoiceId, t.position)])

/** The last invoice number given per company and year; its row lock keeps numbers gapless. */
export const invoiceCounters = pgTable('invoice_counters', {
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  year: smallint('year').notNull(),
  lastSeq: integer('last_seq').notNull().default(0),
}, t => [primaryKey({ columns: [t.companyId, t.year] })])

/** Every payment-provider event received, once: the id is the provider's event id. */
export const paymentEvents = pgTable('payment_events', {
  id: text('id').primaryKey(),
  type: text('type').notNull(),
  invoiceId: uuid('invoice_id').references(() => invoices.id, { onDelete: 'set null' }),
  /** What the event did: applied, ignored (and why). */
  outcome: text('outcome').notNull(),
  payload: jsonb('payload').notNull(),
  receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [index('payment_events_invoice_idx').on(t.invoiceId)])

/** One run of a scheduled job (billing:renew): when, what it did and what failed. */
export const taskRuns = pgTable('task_runs', {
  id: id(),
  name: text('name').notNull(),
  /** Set when the run covered one company only (the owner's "run now"). */
  companyId: uuid('company_id').references(() => companies.id, { onDelete: 'cascade' }),
  startedAt: timestamp('started_at', { withTimezone: true }).notNull().defaultNow(),
  finishedAt: timestamp('finished_at', { withTimezone: true }),
  /** running | done | done_with_errors | skipped | crashed */
  status: text('status').notNull(),
  summary: jsonb('summary').$type<Record<string, number>>().notNull().default({}),
  errors: jsonb('errors').$type<Array<{ companyId: string, subject: string, message: string }>>().notNull().default([]),
  processed: bigint('processed', { mode: 'number' }).notNull().default(0),
}, t => [index('task_runs_name_started_idx').on(t.name, t.startedAt)])
