import { z } from 'zod'
import { BILLING_CADENCES, VISIT_TYPES } from '../types/schedule'
import { normalizeVisitRule, RecurrenceRuleError } from '../utils/recurrence'
import { isCurrency } from './company'

/** An RRULE body that the scheduler can expand; normalised to canonical form. */
export const visitRuleSchema = z.string().trim().max(300, 'Use at most 300 characters').transform((rule, ctx) => {
  try {
    return normalizeVisitRule(rule)
  }
  catch (err) {
    ctx.addIssue({ code: 'custom', message: err instanceof RecurrenceRuleError ? err.message : 'Not a usable recurrence rule' })
    return z.NEVER
  }
})

export const checklistItemSchema = z.object({
  label: z.string().trim().min(1, 'Name the checklist item').max(200),
})

export const visitTemplateSchema = z.object({
  /** Present when editing an existing template, so its visits keep their identity. */
  id: z.uuid().optional(),
  visitType: z.enum(VISIT_TYPES, 'Choose the kind of visit'),
  rrule: visitRuleSchema,
  durationMinutes: z.number('Duration is a number of minutes').int('Use whole minutes').min(10, 'At least 10 minutes').max(720, 'At most 12 hours'),
  checklist: z.array(checklistItemSchema).max(40, 'At most 40 checklist items').default([]),
})
export type VisitTemplateInput = z.output<typeof visitTemplateSchema>

export const planSchema = z.object({
  name: z.string().trim().min(1, 'Name the plan').max(120),
  description: z.string().trim().max(2000).default(''),
  priceMinor: z.number('Price is a number').int('Price is in whole cents').min(0, 'Price cannot be negative').max(100_000_000, 'Price is not plausible'),
  currency: z.string().trim().toUpperCase().refine(isCurrency, 'Use an ISO 4217 currency code, e.g. USD'),
  billingCadence: z.enum(BILLING_CADENCES, 'Choose yearly, monthly or per visit'),
  termMonths: z.number('Term is a number of months').int().min(1, 'At least one month').max(36, 'At most 36 months'),
  autoRenewDefault: z.boolean().default(true),
  templates: z.array(visitTemplateSchema).min(1, 'A plan needs at least one kind of visit').max(20, 'At most 20 visit templates'),
})
export type PlanInput = z.output<typeof planSchema>

export const planUpdateSchema = planSchema.partial().extend({ archived: z.boolean().optional() })
export type PlanUpdateInput = z.output<typeof planUpdateSchema>
