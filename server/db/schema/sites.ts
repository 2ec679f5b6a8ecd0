import { doublePrecision, index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { customers } from './customers'

/** A place the company works at: one or more per customer. */
export const sites = pgTable('sites', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'restrict' }),
  name: text('name').notNull(),
  line1: text('line1').notNull(),
  line2: text('line2').notNull().default(''),
  city: text('city').notNull(),
  region: text('region').notNull().default(''),
  postcode: text('postcode').notNull().default(''),
  country: text('country').notNull().default('US'),
  latitude: doublePrecision('latitude'),
  longitude: doublePrecision('longitude'),
  /** Metres above sea level; sets the pressure for dissolved-oxygen saturation. */
  altitudeM: doublePrecision('altitude_m'),
  accessNotes: text('access_notes').notNull().default(''),
  /** Staff only: never sent to a customer's browser or e-mail. */
  gateCode: text('gate_code').notNull().default(''),
  hazards: text('hazards').array().notNull().default([]),
  hazardNotes: text('hazard_notes').notNull().default(''),
  archivedAt: timestamp('archived_at', { withTimezone: true }),
  ...timestamps,
}, t => [
  index('sites_customer_idx').on(t.customerId),
  index('sites_company_city_idx').on(t.companyId, t.city),
])
