import { z } from 'zod'
import { createSchema, decimal, text, timestamp, updateSchema } from './fields'
import type { UnitSystem } from '../utils/water/format'
import { perUnitSystem, waterReadingSchemaFor } from './water'

export const CHECK_STATES = ['done', 'not_needed', 'problem'] as const

export const checklistStateSchema = z.object({
  label: text(200, 'Name the checklist item'),
  state: z.enum(CHECK_STATES, 'Choose done, not needed or problem').nullable().default(null),
  note: text(500).default(''),
}).refine(c => c.state !== 'problem' || c.note.length > 0, { path: ['note'], message: 'Say what the problem is' })

/** One test as recorded on a visit; messages quote limits in `system`'s units. */
export const recordedReadingSchemaFor = perUnitSystem((system: UnitSystem) => waterReadingSchemaFor(system).extend({
  /** Made by the browser: a resubmission updates the same reading. */
  id: z.uuid('Not a valid reading id'),
  featureId: z.uuid('Choose the water feature'),
  takenAt: timestamp,
}))
export const recordedReadingSchema = recordedReadingSchemaFor('metric')
export type RecordedReading = z.output<typeof recordedReadingSchema>

export const recordedDoseSchema = z.object({
  id: z.uuid('Not a valid dose id'),
  featureId: z.uuid('Choose the water feature'),
  productId: z.uuid().nullish(),
  productName: text(120, 'Name what was added'),
  isTopUp: z.boolean().default(false),
  amount: decimal('Amount', 0, 1_000_000, { max: 'Amount is not plausible' }).positive('Amount must be more than 0'),
  unit: text(20, 'Give the unit'),
  dosedAt: timestamp,
})
export type RecordedDose = z.output<typeof recordedDoseSchema>

/** The whole record of a visit as the technician's phone holds it; saving it twice is harmless. */
export const visitRecordSchemaFor = perUnitSystem((system: UnitSystem) => z.object({
  checklist: z.array(checklistStateSchema).max(60),
  customerNotes: text(4000).default(''),
  internalNotes: text(4000).default(''),
  readings: z.array(recordedReadingSchemaFor(system)).max(40, 'At most 40 water tests on one visit'),
  doses: z.array(recordedDoseSchema).max(60, 'At most 60 doses on one visit'),
}))
export const visitRecordSchema = visitRecordSchemaFor('metric')
export type VisitRecordInput = z.output<typeof visitRecordSchema>

export const skipSchema = z.object({ reason: text(300, 'Say why the visit was skipped') })

/** A treatment product's fields, without defaults: create and update are made from them. */
const productFields = {
  name: text(120, 'Name the product by what it is'),
  kind: z.enum(['dechlorinator', 'bacteria', 'kh_buffer', 'salt', 'other'], 'Choose what kind of treatment it is'),
  labelAmount: decimal('Label amount', 0, 100_000).positive('Label amount must be more than 0'),
  labelUnit: text(20, 'Give the unit, e.g. mL'),
  labelPerLitres: decimal('Label volume', 0, 10_000_000).positive('Label volume must be more than 0'),
  /** The whole list: sending it replaces the cautions. */
  cautions: z.array(text(300, 'A caution cannot be empty')).max(10, 'At most 10 cautions'),
}
export const productSchema = createSchema(productFields, { cautions: [] })
/** PATCH: exactly the fields sent change; `archived` alone archives or restores. */
export const productUpdateSchema = updateSchema(productFields, { archived: z.boolean('Choose true or false') })
