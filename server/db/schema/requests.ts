import { date, index, pgEnum, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { REQUEST_KINDS, REQUEST_STATUSES } from '../../../shared/types/requests'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { customers } from './customers'
import { waterFeatures } from './features'
import { sites } from './sites'
import { users } from './users'
import { visits } from './visits'

export const requestKind = pgEnum('request_kind', REQUEST_KINDS)
export const requestStatus = pgEnum('request_status', REQUEST_STATUSES)

/** A customer's request for a visit (a leak, green water, a fault…), handled in the owner's inbox. */
export const serviceRequests = pgTable('service_requests', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'cascade' }),
  siteId: uuid('site_id').notNull().references(() => sites.id, { onDelete: 'restrict' }),
  featureId: uuid('feature_id').references(() => waterFeatures.id, { onDelete: 'set null' }),
  kind: requestKind('kind').notNull(),
  /** Company-local dates the customer would like, best first. */
  preferredDates: date('preferred_dates').array().notNull().default([]),
  description: text('description').notNull(),
  status: requestStatus('status').notNull().default('new'),
  /** The visit booked for it. */
  visitId: uuid('visit_id').references(() => visits.id, { onDelete: 'set null' }),
  /** The owner's answer, shown to the customer. */
  reply: text('reply').notNull().default(''),
  createdBy: uuid('created_by').references(() => users.id, { onDelete: 'set null' }),
  handledBy: uuid('handled_by').references(() => users.id, { onDelete: 'set null' }),
  handledAt: timestamp('handled_at', { withTimezone: true }),
  ...timestamps,
}, t => [
  index('service_requests_company_status_idx').on(t.companyId, t.status, t.createdAt),
  index('service_requests_customer_idx').on(t.customerId, t.createdAt),
  index('service_requests_visit_idx').on(t.visitId),
])
