import { z } from 'zod'
import { localDate, text } from './fields'

/** The longest day-off range taken at once (a long absence is entered in parts). */
export const DAY_OFF_MAX_DAYS = 366

/** A technician's day off: one day (`to` left out) or a from–to range, with the reason in words. */
export const dayOffCreateSchema = z.object({
  from: localDate,
  to: localDate.optional(),
  reason: text(200, 'Say why, e.g. holiday, training or sick'),
}).refine(d => d.to === undefined || d.to >= d.from, { path: ['to'], message: 'The last day off is before the first' })
  .refine(d => d.to === undefined || (Date.parse(d.to) - Date.parse(d.from)) / 86_400_000 < DAY_OFF_MAX_DAYS, { path: ['to'], message: `Enter at most ${DAY_OFF_MAX_DAYS} days at a time` })
export type DayOffInput = z.output<typeof dayOffCreateSchema>

export const dayOffParams = z.object({
  id: z.uuid('Not a valid technician id'),
  dayOffId: z.uuid('Not a valid day-off id'),
})
