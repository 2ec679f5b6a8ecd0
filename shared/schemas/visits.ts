import { z } from 'zod'
import { VISIT_STATUSES, VISIT_TYPES } from '../types/schedule'
import { decimal, localDate, text, updateSchema, wholeNumber, workingWeekdays } from './fields'

export const boardQuery = z.object({
  from: localDate,
  to: localDate,
  technicianId: z.union([z.uuid(), z.literal('unassigned')]).optional(),
  visitType: z.enum(VISIT_TYPES).optional(),
  includeCancelled: z.coerce.boolean().default(false),
  /** Visit cards of this one day only; the load of every technician-day still covers the whole range. */
  day: localDate.optional(),
}).refine(q => q.to >= q.from, { path: ['to'], message: 'The end is before the start' })
  .refine(q => (Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 <= 62, { path: ['to'], message: 'Ask for at most 62 days at a time' })
  .refine(q => q.day === undefined || (q.day >= q.from && q.day <= q.to), { path: ['day'], message: 'Pick a day inside the range shown' })

/**
 * The most visit cards one board answer carries. A range (or a technician or day picked in it)
 * with more answers each technician-day's load and says how many visits it holds, never a cut list.
 */
export const BOARD_VISIT_LIMIT = 1000

/** PATCH: assign, move (with a reason) or resize a visit; exactly the fields sent change. */
export const visitUpdateSchema = updateSchema({
  technicianId: z.uuid('Choose a technician').nullable(),
  scheduledOn: localDate,
  moveReason: text(300),
  durationMinutes: wholeNumber('Duration', 10, 720, { min: 'At least 10 minutes', max: 'At most 12 hours' }),
}).refine(v => v.scheduledOn === undefined || (v.moveReason?.length ?? 0) > 0, { path: ['moveReason'], message: 'Say why the visit moves' })
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

/**
 * PATCH of a technician's capacity, home base and own working weekdays (null: the company's);
 * exactly the fields sent change.
 */
export const staffProfileSchema = updateSchema({
  capacityMinutes: wholeNumber('Capacity', 60, 960, { min: 'At least an hour', max: 'At most 16 hours' }),
  homeLatitude: decimal('Latitude', -90, 90).nullable(),
  homeLongitude: decimal('Longitude', -180, 180).nullable(),
  workingDays: workingWeekdays.nullable(),
})
export type StaffProfileInput = z.output<typeof staffProfileSchema>

export const visitStatusFilter = z.enum(VISIT_STATUSES)
