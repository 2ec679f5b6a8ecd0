import { date, doublePrecision, index, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import type { FeatureEquipment, FishStock } from '../../../shared/schemas/features'
import { FEATURE_KINDS, type FeatureShape, type RangeTable } from '../../../shared/types/water'
import { id, timestamps } from './columns'
import { companies } from './companies'
import { customers } from './customers'
import { sites } from './sites'

export const featureKind = pgEnum('feature_kind', FEATURE_KINDS)

/** Range tables per company: the three defaults (seeded from shared/utils/water) and any of the owner's own. */
export const rangeProfiles = pgTable('range_profiles', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  /** koi_pond, water_garden, pondless for the defaults. */
  key: text('key').notNull(),
  name: text('name').notNull(),
  ranges: jsonb('ranges').$type<RangeTable>().notNull(),
  ...timestamps,
}, t => [
  uniqueIndex('range_profiles_company_key').on(t.companyId, t.key),
])

/** A pond, stream, pondless waterfall, fountain or wetland filter at a site. Sizes in SI. */
export const waterFeatures = pgTable('water_features', {
  id: id(),
  companyId: uuid('company_id').notNull().references(() => companies.id, { onDelete: 'cascade' }),
  /** Same as the site's customer; kept here so tenancy checks need no join. */
  customerId: uuid('customer_id').notNull().references(() => customers.id, { onDelete: 'restrict' }),
  siteId: uuid('site_id').notNull().references(() => sites.id, { onDelete: 'restrict' }),
  name: text('name').notNull(),
  kind: featureKind('kind').notNull(),
  shape: jsonb('shape').$type<FeatureShape>().notNull(),
  surfaceAreaM2: doublePrecision('surface_area_m2').notNull(),
  computedVolumeL: doublePrecision('computed_volume_l').notNull(),
  /** The owner's measured figure (e.g. from a meter at fill-up); wins over the computed one. */
  measuredVolumeL: doublePrecision('measured_volume_l'),
  equipment: jsonb('equipment').$type<FeatureEquipment>().notNull(),
  fish: jsonb('fish').$type<FishStock[]>().notNull().default([]),
  plants: text('plants').notNull().default(''),
  notes: text('notes').notNull().default(''),
  installedOn: date('installed_on'),
  /** Another profile than the kind's default, and per-feature overrides of single bounds. */
  rangeProfileId: uuid('range_profile_id').references(() => rangeProfiles.id, { onDelete: 'set null' }),
  rangeOverrides: jsonb('range_overrides').$type<RangeTable>().notNull().default({}),
  archivedAt: timestamp('archived_at', { withTimezone: true }),
  ...timestamps,
}, t => [
  index('water_features_site_idx').on(t.siteId),
  index('water_features_customer_idx').on(t.customerId),
  index('water_features_company_kind_idx').on(t.companyId, t.kind),
])
