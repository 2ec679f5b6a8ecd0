import { z } from 'zod'
import { waterReadingSchema } from './water'

export const CHECK_STATES = ['done', 'not_needed', 'problem'] as const

export const checklistStateSchema = z.object({
  label: z.string().trim().min(1).max(200),
  state: z.enum(CHECK_STATES, 'Choose done, not needed or problem').nullable().default(null),
  note: z.string().trim().max(500).default(''),
}).refine(c => c.state !== 'problem' || c.note.length > 0, { path: ['note'], message: 'Say what the problem is' })

export const recordedReadingSchema = waterReadingSchema.extend({
  /** Made by the browser: a resubmission updates the same reading. */
  id: z.uuid('Not a valid reading id'),
  featureId: z.uuid('Choose the water feature'),
  takenAt: z.iso.datetime({ offset: true, message: 'Use an ISO date and time' }),
})
export type RecordedReading = z.output<typeof recordedReadingSchema>

export const recordedDoseSchema = z.object({
  id: z.uuid('Not a valid dose id'),
  featureId: z.uuid('Choose the water feature'),
  productId: z.uuid().nullish(),
  productName: z.string().trim().min(1, 'Name what was added').max(120),
  isTopUp: z.boolean().default(false),
  amount: z.number('Amount is a number').positive('Amount must be more than 0').max(1_000_000, 'Amount is not plausible'),
  unit: z.string().trim().min(1, 'Give the unit').max(20),
  dosedAt: z.iso.datetime({ offset: true, message: 'Use an ISO date and time' }),
})
export type RecordedDose = z.output<typeof recordedDoseSchema>

/** The whole record of a visit as the technician's phone holds it; saving it twice is harmless. */
export const visitRecordSchema = z.object({
  checklist: z.array(checklistStateSchema).max(60),
  customerNotes: z.string().trim().max(4000).default(''),
  internalNotes: z.string().trim().max(4000).default(''),
  readings: z.array(recordedReadingSchema).max(40, 'At most 40 water tests on one visit'),
  doses: z.array(recordedDoseSchema).max(60, 'At most 60 doses on one visit'),
})
export type VisitRecordInput = z.output<typeof visitRecordSchema>

export const skipSchema = z.object({ reason: z.string().trim().min(1, 'Say why the visit was skipped').max(300) })

export const productSchema = z.object({
  name: z.string().trim().min(1, 'Name the product by what it is').max(120),
  kind: z.enum(['dechlorinator', 'bacteria', 'kh_buffer', 'salt', 'other'], 'Choose what kind of treatment it is'),
  labelAmount: z.number('Label amount is a number').positive('Label amount must be more than 0').max(100_000),
  labelUnit: z.string().trim().min(1, 'Give the unit, e.g. mL').max(20),
  labelPerLitres: z.number('Label volume is a number').positive('Label volume must be more than 0').max(10_000_000),
  cautions: z.array(z.string().trim().min(1).max(300)).max(10).default([]),
})
export const productUpdateSchema = productSchema.partial().extend({ archived: z.boolean().optional() })
