import { z } from 'zod'
import { createSchema, moneyMinor, safeString, text, updateSchema, wholeNumber } from './fields'
import { BILLING_CADENCES, VISIT_TYPES } from '../types/schedule'
import { normalizeVisitRule, RecurrenceRuleError } from '../utils/recurrence'
import { parseVisitSchedule, VisitScheduleError } from '../utils/visit-windows'
import { isCurrency } from './company'
import { isLegacyVisitRule, legacyRuleToVisitSchedule } from './visit-schedule'

/** An RRULE body that the scheduler can expand; normalised to canonical form. A rule with more than FREQ and INTERVAL is read as a season (see visit-schedule.ts). */
export const visitRuleSchema = safeString('The rule').trim().max(300, 'Use at most 300 characters').transform((rule, ctx) => {
  try {
    return normalizeVisitRule(rule)
  }
  catch (err) {
    ctx.addIssue({ code: 'custom', message: err instanceof RecurrenceRuleError ? err.message : 'Not a usable recurrence rule' })
    return z.NEVER
  }
})

export const checklistItemSchema = z.object({
  label: text(200, 'Name the checklist item'),
})

export const visitTemplateSchema = z.object({
  /** Present when editing an existing template, so its visits keep their identity. */
  id: z.uuid().optional(),
  visitType: z.enum(VISIT_TYPES, 'Choose the kind of visit'),
  /** How often: FREQ=YEARLY (once in the season), FREQ=WEEKLY;INTERVAL=2, FREQ=MONTHLY… */
  rrule: visitRuleSchema,
  /** The season, 'MM-DD' to 'MM-DD'; the whole year when left out. */
  seasonFrom: safeString('The season start').trim().max(5, 'Give the season start as MM-DD, e.g. 04-01 for 1 April').optional(),
  seasonTo: safeString('The season end').trim().max(5, 'Give the season end as MM-DD, e.g. 09-30 for 30 September').optional(),
  /** Days either side of each visit it may move. */
  toleranceDays: z.number('Give the days as a whole number').optional(),
  durationMinutes: wholeNumber('Duration', 10, 720, { min: 'At least 10 minutes', max: 'At most 12 hours' }),
  checklist: z.array(checklistItemSchema).max(40, 'At most 40 checklist items').default([]),
}).transform((t, ctx) => {
  const { seasonFrom, seasonTo, toleranceDays, ...rest } = t
  const windowGiven = seasonFrom !== undefined || seasonTo !== undefined || toleranceDays !== undefined
  try {
    const schedule = isLegacyVisitRule(t.rrule) && !windowGiven
      ? legacyRuleToVisitSchedule(t.rrule)
      : parseVisitSchedule({ rrule: t.rrule, from: seasonFrom ?? '01-01', to: seasonTo ?? '12-31', toleranceDays: toleranceDays ?? 0 })
    return { ...rest, rrule: schedule.rrule, seasonFrom: schedule.from, seasonTo: schedule.to, toleranceDays: schedule.toleranceDays }
  }
  catch (err) {
    if (!(err instanceof VisitScheduleError)) throw err
    const path = { from: 'seasonFrom', to: 'seasonTo', toleranceDays: 'toleranceDays' }[err.field] ?? 'rrule'
    const message = err.message.replace(/^from\b/, 'The season start').replace(/^to\b/, 'The season end').replace(/^toleranceDays\b/, 'The days either side')
    ctx.addIssue({ code: 'custom', path: [path], message })
    return z.NEVER
  }
})
export type VisitTemplateInput = z.output<typeof visitTemplateSchema>

/** A plan's fields, without defaults: create and update are made from them. */
const planFields = {
  name: text(120, 'Name the plan'),
  description: text(2000),
  priceMinor: moneyMinor('Price', { max: 100_000_000 }),
  currency: text(10).toUpperCase().refine(isCurrency, 'Use an ISO 4217 currency code, e.g. USD'),
  billingCadence: z.enum(BILLING_CADENCES, 'Choose yearly, monthly or per visit'),
  termMonths: wholeNumber('Term', 1, 36, { min: 'At least one month', max: 'At most 36 months' }),
  autoRenewDefault: z.boolean('Choose yes or no'),
  /** The whole list: sending it replaces the templates (each keeps its id when sent with it). */
  templates: z.array(visitTemplateSchema).min(1, 'A plan needs at least one kind of visit').max(20, 'At most 20 visit templates'),
}
export const planSchema = createSchema(planFields, { description: '', autoRenewDefault: true })
export type PlanInput = z.output<typeof planSchema>

/** PATCH: exactly the fields sent change; `archived` alone archives or restores. */
export const planUpdateSchema = updateSchema(planFields, { archived: z.boolean('Choose true or false') })
export type PlanUpdateInput = z.output<typeof planUpdateSchema>
