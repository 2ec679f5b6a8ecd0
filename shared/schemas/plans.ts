import { z } from 'zod'
import { createSchema, moneyMinor, safeString, text, updateSchema, wholeNumber } from './fields'
import { BILLING_CADENCES, VISIT_TYPES } from '../types/schedule'
import { normalizeVisitRule, RecurrenceRuleError } from '../utils/recurrence'
import { isCurrency } from './company'

/** An RRULE body that the scheduler can expand; normalised to canonical form. */
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
  rrule: visitRuleSchema,
  durationMinutes: wholeNumber('Duration', 10, 720, { min: 'At least 10 minutes', max: 'At most 12 hours' }),
  checklist: z.array(checklistItemSchema).max(40, 'At most 40 checklist items').default([]),
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
