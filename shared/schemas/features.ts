import { z } from 'zod'
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
const isoDate = z.iso.date('Use a date like 2025-04-15')

export const pumpSchema = z.object({
  name: z.string().trim().min(1, 'Name the pump').max(80),
  role: z.enum(PUMP_ROLES, 'Choose what the pump feeds'),
  /** Rated flow, litres per hour. */
  ratedFlowLph: z.number('Rated flow is a number').positive('Rated flow must be more than 0').max(200_000, 'Rated flow above 200,000 L/h is not plausible'),
})

export const INTAKES = ['none', 'skimmer', 'intake_bay'] as const

export const equipmentSchema = z.object({
  pumps: z.array(pumpSchema).max(12, 'At most 12 pumps').default([]),
  intake: z.enum(INTAKES, 'Choose skimmer, intake bay or none').default('none'),
  biologicalFilter: z.boolean().default(false),
  wetlandFilter: z.boolean().default(false),
  uvClarifier: z.object({
    watts: z.number().positive('Wattage must be more than 0').max(1000).nullish(),
    bulbInstalledOn: isoDate.nullish(),
  }).nullish(),
  aerator: z.boolean().default(false),
  deIcer: z.boolean().default(false),
  autoDosing: z.boolean().default(false),
  ionizer: z.boolean().default(false),
  notes: z.string().trim().max(2000).default(''),
})
export type FeatureEquipment = z.output<typeof equipmentSchema>

export const fishSchema = z.object({
  kind: z.string().trim().min(1, 'Name the fish, e.g. koi').max(60),
  count: z.number().int('Count whole fish').min(0).max(100_000),
})
export type FishStock = z.output<typeof fishSchema>

const rangeSchema = z.object({
  actBelow: z.number().optional(),
  watchBelow: z.number().optional(),
  watchAbove: z.number().optional(),
  actAbove: z.number().optional(),
  target: z.number().optional(),
  source: z.string().trim().max(300).default('set by the company'),
  sourceKind: z.enum(['published', 'common practice']).default('common practice'),
}).refine(r => r.actBelow === undefined || r.watchBelow === undefined || r.actBelow <= r.watchBelow, { path: ['actBelow'], message: 'The act limit must not be above the watch limit' })
  .refine(r => r.actAbove === undefined || r.watchAbove === undefined || r.actAbove >= r.watchAbove, { path: ['actAbove'], message: 'The act limit must not be below the watch limit' })

export const rangeTableSchema = z.partialRecord(z.enum(PARAMETERS), rangeSchema)

export const featureSchema = z.object({
  siteId: z.uuid('Choose a site'),
  name: z.string().trim().min(1, 'Name the feature, e.g. Koi pond').max(120),
  kind: z.enum(FEATURE_KINDS, 'Choose the kind of feature'),
  shape: shapeSchema,
  measuredVolumeL: z.number('Measured volume is a number').positive('Measured volume must be more than 0').max(5_000_000).nullish(),
  equipment: equipmentSchema.default(() => equipmentSchema.parse({})),
  fish: z.array(fishSchema).max(30).default([]),
  plants: z.string().trim().max(2000).default(''),
  notes: z.string().trim().max(4000).default(''),
  installedOn: isoDate.nullish(),
  rangeProfileId: z.uuid().nullish(),
  rangeOverrides: rangeTableSchema.default({}),
})
export type FeatureInput = z.output<typeof featureSchema>

export const featureUpdateSchema = featureSchema.omit({ siteId: true }).partial().extend({
  archived: z.boolean().optional(),
})
export type FeatureUpdateInput = z.output<typeof featureUpdateSchema>
