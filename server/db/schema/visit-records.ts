import { bigint, boolean, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import type { ParameterEvaluation, ReadingStatus } from '../../../shared/types/water'
import { timestamps, id } from './columns'
import { companies } from './companies'
import { waterFeatures } from './features'
import { users } from './users'
import { serviceRequests } from './requests'
import { visits } from './visits'

export const productKind = pgEnum('product_kind', ['dechlorinator', 'bacteria', 'kh_buffer', 'salt', 'other'])
export const ammoniaBasisEnum = pgEnum('ammonia_basis', ['N', 'NH3'])
export const readingSource = pgEnum('reading_source', ['technician', 'customer'])

/** The company's treatment catalogue: products named by what they are, with the label's rate. */
export const products = pgTable('products', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  name: text('name').notNull(),
  kind: productKind('kind').notNull(),
  /** Label rate: `labelAmount` of `labelUnit` per `labelPerLitres` litres of pond water. */
  labelAmount: doublePrecision('label_amount').notNull(),
  labelUnit: text('label_unit').notNull(),
  labelPerLitres: doublePrecision('label_per_litres').notNull(),
  cautions: text('cautions').array().notNull().default([]),
  archivedAt: timestamp('archived_at', { withTimezone: true }),
  ...timestamps,
}, t => [index('products_company_idx').on(t.companyId)])

/** One water test of one feature. The id comes from the client, so a resubmission is the same row. */
export const readings = pgTable('readings', {
  id: uuid('id').primaryKey(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  featureId: uuid('feature_id').notNull().references(() => waterFeatures.id, { onDelete: 'restrict' }),
  visitId: uuid('visit_id').references(() => visits.id, { onDelete: 'set null' }),
  source: readingSource('source').notNull().default('technician'),
  takenAt: timestamp('taken_at', { withTimezone: true }).notNull(),
  enteredBy: uuid('entered_by').references(() => users.id, { onDelete: 'set null' }),
  temperatureC: doublePrecision('temperature_c'),
  pH: doublePrecision('ph'),
  totalAmmoniaMgL: doublePrecision('total_ammonia_mg_l'),
  ammoniaBasis: ammoniaBasisEnum('ammonia_basis').notNull().default('N'),
  nitriteMgL: doublePrecision('nitrite_mg_l'),
  nitrateMgL: doublePrecision('nitrate_mg_l'),
  khMgL: doublePrecision('kh_mg_l'),
  ghMgL: doublePrecision('gh_mg_l'),
  dissolvedOxygenMgL: doublePrecision('dissolved_oxygen_mg_l'),
  saltGL: doublePrecision('salt_g_l'),
  chlorineMgL: doublePrecision('chlorine_mg_l'),
  phosphateMgL: doublePrecision('phosphate_mg_l'),
  waterLevelMm: doublePrecision('water_level_mm'),
  /** Computed when saved, from the ranges in force then. */
  nh3MgL: doublePrecision('nh3_mg_l'),
  doSaturationPct: doublePrecision('do_saturation_pct'),
  overall: text('overall').$type<ReadingStatus>().notNull().default('ok'),
  evaluation: jsonb('evaluation').$type<ParameterEvaluation[]>().notNull().default([]),
  /** Insertion order, for the alert scan's watermark. */
  seq: bigint('seq', { mode: 'number' }).generatedAlwaysAsIdentity(),
  ...timestamps,
}, t => [
  index('readings_feature_taken_idx').on(t.featureId, t.takenAt),
  index('readings_visit_idx').on(t.visitId),
  index('readings_seq_idx').on(t.seq),
])

/** What was added to a feature's water: a product dose, or a top-up of fresh water (litres). */
export const doses = pgTable('doses', {
  id: uuid('id').primaryKey(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  visitId: uuid('visit_id').references(() => visits.id, { onDelete: 'set null' }),
  featureId: uuid('feature_id').notNull().references(() => waterFeatures.id, { onDelete: 'restrict' }),
  productId: uuid('product_id').references(() => products.id, { onDelete: 'set null' }),
  /** The product's name at the time, or "Top-up water". */
  productName: text('product_name').notNull(),
  isTopUp: boolean('is_top_up').notNull().default(false),
  amount: doublePrecision('amount').notNull(),
  unit: text('unit').notNull(),
  dosedAt: timestamp('dosed_at', { withTimezone: true }).notNull(),
  ...timestamps,
}, t => [index('doses_feature_idx').on(t.featureId, t.dosedAt), index('doses_visit_idx').on(t.visitId)])

/** A photo from a visit or attached to a customer's request; the files live in unstorage (`uploads`), keyed by id. */
export const photos = pgTable('photos', {
  id: uuid('id').primaryKey(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  visitId: uuid('visit_id').references(() => visits.id, { onDelete: 'cascade' }),
  requestId: uuid('request_id').references(() => serviceRequests.id, { onDelete: 'cascade' }),
  customerId: uuid('customer_id').notNull(),
  featureId: uuid('feature_id').references(() => waterFeatures.id, { onDelete: 'set null' }),
  contentType: text('content_type').notNull(),
  width: integer('width').notNull(),
  height: integer('height').notNull(),
  bytes: integer('bytes').notNull(),
  caption: text('caption').notNull().default(''),
  uploadedBy: uuid('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, t => [index('photos_visit_idx').on(t.visitId), index('photos_request_idx').on(t.requestId)])

export const outboxStatus = pgEnum('outbox_status', ['pending', 'sent', 'failed'])

/**
 * Every e-mail, written in the same transaction as the change that causes it, then sent by the
 * mail:flush task. `dedupeKey` is unique: the same message is never queued twice.
 */
export const outbox = pgTable('outbox', {
  id: id(),
  companyId: uuid('company_id').references(() => companies.id, { onDelete: 'cascade' }),
  dedupeKey: text('dedupe_key').notNull().unique(),
  to: text('to').array().notNull(),
  subject: text('subject').notNull(),
  html: text('html').notNull(),
  text: text('text').notNull(),
  /** Inline images: { cid, filename, contentType, storageKey } read from uploads at send time. */
  attachments: jsonb('attachments').$type<Array<{ cid: string, filename: string, contentType: string, storageKey: string }>>().notNull().default([]),
  status: outboxStatus('status').notNull().default('pending'),
  attempts: integer('attempts').notNull().default(0),
  nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
  lastError: text('last_error'),
  sentAt: timestamp('sent_at', { withTimezone: true }),
  messageId: text('message_id'),
  ...timestamps,
}, t => [index('outbox_pending_idx').on(t.status, t.nextAttemptAt)])
