import { z } from 'zod'
import { VISIT_STATUSES, VISIT_TYPES } from '../types/schedule'
import { localDate } from './contracts'

export const boardQuery = z.object({
  from: localDate,
  to: localDate,
  technicianId: z.union([z.uuid(), z.literal('unassigned')]).optional(),
  visitType: z.enum(VISIT_TYPES).optional(),
  includeCancelled: z.coerce.boolean().default(false),
}).refine(q => q.to >= q.from, { path: ['to'], message: 'The end is before the start' })
  .refine(q => (Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 <= 62, { path: ['to'], message: 'Ask for at most 62 days at a time' })

export const visitUpdateSchema = z.object({
  technicianId: z.uuid('Choose a technician').nullable().optional(),
  scheduledOn: localDate.optional(),
  moveReason: z.string().trim().max(300).optional(),
  durationMinutes: z.number().int().min(10).max(720).optional(),
}).refine(v => v.scheduledOn === undefined || (v.moveReason?.length ?? 0) > 0, { path: ['moveReason'], message: 'Say why the visit moves' })
  .refine(v => Object.keys(v).length > 0, { path: ['_'], message: 'Nothing to change' })
export type VisitUpdateInput = z.output<typeof visitUpdateSchema>

export const todayQuery = z.object({
  date: localDate.optional(),
  technicianId: z.uuid().optional(),
})

export const routeOrderSchema = z.object({
  date: localDate,
  /** The day's visits in the order wanted; empty goes back to the computed order. */
  visitIds: z.array(z.uuid('Not a valid visit id')).max(60),
})

export const staffProfileSchema = z.object({
  capacityMinutes: z.number().int().min(60, 'At least an hour').max(960, 'At most 16 hours'),
  homeLatitude: z.number().min(-90).max(90).nullable(),
  homeLongitude: z.number().min(-180).max(180).nullable(),
}).partial()

export const visitStatusFilter = z.enum(VISIT_STATUSES)
