import { boolean, index, integer, pgEnum, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { companies } from './companies'

export const customerKind = pgEnum('customer_kind', ['household', 'business', 'association', 'public'])

export const customers = pgTable('customers', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  kind: customerKind('kind').notNull().default('household'),
  billingLine1: text('billing_line1').notNull().default(''),
  billingLine2: text('billing_line2').notNull().default(''),
  billingCity: text('billing_city').notNull().default(''),
  billingRegion: text('billing_region').notNull().default(''),
  billingPostcode: text('billing_postcode').notNull().default(''),
  /** ISO 3166-1 alpha-2. */
  billingCountry: text('billing_country').notNull().default('US'),
  tags: text('tags').array().notNull().default([]),
  notes: text('notes').notNull().default(''),
  active: boolean('active').notNull().default(true),
  /** Set instead of deleting a customer that has history. */
  archivedAt: timestamp('archived_at', { withTimezone: true }),
  /** The payment provider's customer id, made the first time the customer is billed there. */
  paymentCustomerId: text('payment_customer_id'),
  ...timestamps,
}, t => [
  index('customers_company_name_idx').on(t.companyId, t.name),
])

/** People at a customer: who gets visit reports, invoices and alerts. */
export const customerContacts = pgTable('customer_contacts', {
  id: id(),
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  email: text('email'),
  phone: text('phone'),
  getsReports: boolean('gets_reports').notNull().default(true),
  getsInvoices: boolean('gets_invoices').notNull().default(true),
  getsAlerts: boolean('gets_alerts').notNull().default(true),
  position: integer('position').notNull().default(0),
  ...timestamps,
}, t => [
  index('customer_contacts_customer_idx').on(t.customerId, t.position),
  index('customer_contacts_email_idx').on(t.email),
])
