import { z } from 'zod'
import { localDate } from './fields'

/** At most about half a year is planned again in one go. */
export const REPLAN_MAX_DAYS = 183

const range = { from: localDate, to: localDate }
const rangeChecks = <T extends { from: string, to: string }>(s: z.ZodType<T>) => s
  .refine(q => q.to >= q.from, { path: ['to'], message: 'The last day is before the first' })
  .refine(q => (Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 < REPLAN_MAX_DAYS, { path: ['to'], message: `Plan at most ${REPLAN_MAX_DAYS} days (about 26 weeks) at a time` })

/** "Plan these weeks again": without `apply`, a preview; with `apply: true` and the preview's `token`, that preview applied. */
export const replanBody = rangeChecks(z.object({
  ...range,
  apply: z.boolean('Choose true or false').optional(),
  token: z.string('Send the token the preview gave').max(128, 'Send the token the preview gave').optional(),
})).refine(q => !q.apply || !!q.token, { path: ['token'], message: 'Send the token the preview gave, so only what you saw is applied' })

export const unplacedQuery = rangeChecks(z.object(range))
