import { z } from 'zod'
import { createSchema, decimal, localDate, text, updateSchema, wholeNumber } from './fields'
import { FEATURE_KINDS, PARAMETERS } from '../types/water'

export const FEATURE_KIND_LABELS: Record<(typeof FEATURE_KINDS)[number], string> = {
  koi_pond: 'Koi pond',
  water_garden: 'Water garden',
  pondless_waterfall: 'Pondless waterfall',
  stream: 'Stream',
  fountain: 'Fountain or urn',
  wetland_filter: 'Wetland (bog) filter',
}

// Sizes are metres; the form converts from the company's units before validating.
const metres = (what: string, max: number) => z.number(`${what} is a number`).positive(`${what} must be more than 0`).max(max, `${what} above ${max} m is not plausible`)

const shelfSchema = z.object({
  lengthM: metres('Shelf length', 500),
  widthM: metres('Shelf width', 5),
  depthM: metres('Shelf depth', 2),
})

export const shapeSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('rectangle'), lengthM: metres('Length', 200), widthM: metres('Width', 200), depthM: metres('Depth', 10), shelf: shelfSchema.nullish() }),
  z.object({ kind: z.literal('circle'), diameterM: metres('Diameter', 200), depthM: metres('Depth', 10), shelf: shelfSchema.nullish() }),
  z.object({ kind: z.literal('oval'), lengthM: metres('Length', 200), widthM: metres('Width', 200), depthM: metres('Depth', 10), shelf: shelfSchema.nullish() }),
  z.object({ kind: z.literal('irregular'), lengthM: metres('Average length', 200), widthM: metres('Average width', 200), avgDepthM: metres('Average depth', 10), shelf: shelfSchema.nullish() }),
], 'Choose rectangle, circle, oval or irregular')

export const PUMP_ROLES = ['waterfall', 'filter', 'stream', 'jets', 'fountain', 'aeration', 'other'] as const
const isoDate = localDate

export const pumpSchema = z.object({
  name: text(80, 'Name the pump'),
  role: z.enum(PUMP_ROLES, 'Choose what the pump feeds'),
  /** Rated flow, litres per hour. */
  ratedFlowLph: z.number('Rated flow is a number').positive('Rated flow must be more than 0').max(200_000, 'Rated flow above 200,000 L/h is not plausible'),
})

export const INTAKES = ['none', 'skimmer', 'intake_bay'] as const

/** A feature's equipment, without defaults: the create schema fills them, a PATCH merges what it sends. */
const equipmentFields = {
  /** The whole list: sending it replaces the pumps. */
  pumps: z.array(pumpSchema).max(12, 'At most 12 pumps'),
  intake: z.enum(INTAKES, 'Choose skimmer, intake bay or none'),
  biologicalFilter: z.boolean(),
  wetlandFilter: z.boolean(),
  uvClarifier: z.object({
    watts: decimal('Wattage', 0, 1000, { min: 'Wattage must be more than 0' }).positive('Wattage must be more than 0').nullish(),
    bulbInstalledOn: isoDate.nullish(),
  }).nullable(),
  aerator: z.boolean(),
  deIcer: z.boolean(),
  autoDosing: z.boolean(),
  ionizer: z.boolean(),
  notes: text(2000),
}
export const equipmentSchema = createSchema(equipmentFields, {
  pumps: [], intake: 'none', biologicalFilter: false, wetlandFilter: false, uvClarifier: null, aerator: false, deIcer: false, autoDosing: false, ionizer: false, notes: '',
})
/** Part of the equipment: the keys sent replace theirs, the others stay. */
export const equipmentPatchSchema = updateSchema(equipmentFields)
export type FeatureEquipment = z.output<typeof equipmentSchema>

export const fishSchema = z.object({
  kind: text(60, 'Name the fish, e.g. koi'),
  count: wholeNumber('Count', 0, 100_000, { max: 'Count at most 100,000 fish' }),
})
export type FishStock = z.output<typeof fishSchema>

const limit = (what: string) => decimal(what, -1_000_000, 1_000_000)

const rangeSchema = z.object({
  actBelow: limit('The act-below limit').optional(),
  watchBelow: limit('The watch-below limit').optional(),
  watchAbove: limit('The watch-above limit').optional(),
  actAbove: limit('The act-above limit').optional(),
  target: limit('The target').optional(),
  source: text(300).default('set by the company'),
  sourceKind: z.enum(['published', 'common practice']).default('common practice'),
}).refine(r => r.actBelow === undefined || r.watchBelow === undefined || r.actBelow <= r.watchBelow, { path: ['actBelow'], message: 'The act limit must not be above the watch limit' })
  .refine(r => r.actAbove === undefined || r.watchAbove === undefined || r.actAbove >= r.watchAbove, { path: ['actAbove'], message: 'The act limit must not be below the watch limit' })

export const rangeTableSchema = z.partialRecord(z.enum(PARAMETERS), rangeSchema)

/** A feature's fields (all but its site), without defaults: create and update are made from them. */
const featureFields = {
  name: text(120, 'Name the feature, e.g. Koi pond'),
  kind: z.enum(FEATURE_KINDS, 'Choose the kind of feature'),
  shape: shapeSchema,
  measuredVolumeL: decimal('Measured volume', 0, 5_000_000).positive('Measured volume must be more than 0').nullish(),
  equipment: equipmentSchema,
  /** The whole list: sending it replaces the fish. */
  fish: z.array(fishSchema).max(30, 'At most 30 kinds of fish'),
  plants: text(2000),
  notes: text(4000),
  installedOn: isoDate.nullable(),
  rangeProfileId: z.uuid('Not a valid range profile').nullable(),
  /** The whole table: sending it replaces the overrides. */
  rangeOverrides: rangeTableSchema,
}

export const featureSchema = createSchema({ siteId: z.uuid('Choose a site'), ...featureFields }, {
  equipment: equipmentSchema.parse({}), fish: [], plants: '', notes: '', installedOn: null, rangeProfileId: null, rangeOverrides: {},
})
export type FeatureInput = z.output<typeof featureSchema>

/** PATCH: exactly the fields sent change (equipment key by key); `archived` alone archives or restores. */
export const featureUpdateSchema = updateSchema(featureFields, { equipment: equipmentPatchSchema, archived: z.boolean('Choose true or false') })
export type FeatureUpdateInput = z.output<typeof featureUpdateSchema>
