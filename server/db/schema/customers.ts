import { boolean, index, pgEnum, pgTable, text, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { companies } from './companies'

export const customerKind = pgEnum('customer_kind', ['household', 'business', 'association', 'public'])

export const customers = pgTable('customers', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  kind: customerKind('kind').notNull().default('household'),
  email: text('email'),
  phone: text('phone'),
  notes: text('notes').notNull().default(''),
  active: boolean('active').notNull().default(true),
  ...timestamps,
}, t => [
  index('customers_company_name_idx').on(t.companyId, t.name),
])
