import { z } from 'zod'
import { CONTRACT_STATUSES } from '../types/schedule'
import { pageQuery } from './common'
import { localDate, moneyMinor, text, updateSchema } from './fields'

export { localDate }

/** What a PATCH may change on a contract, without defaults. */
const contractFields = {
  featureIds: z.array(z.uuid('Not a valid feature id')).min(1, 'Choose at least one water feature').max(20, 'At most 20 water features')
    .transform(ids => [...new Set(ids)]),
  termStart: localDate,
  priceOverrideMinor: moneyMinor('Price', { max: 100_000_000 }).nullable(),
  autoRenew: z.boolean('Choose yes or no'),
  notes: text(2000),
}

export const contractSchema = z.object({
  customerId: z.uuid('Choose a customer'),
  planId: z.uuid('Choose a plan'),
  ...contractFields,
  priceOverrideMinor: contractFields.priceOverrideMinor.optional(),
  autoRenew: contractFields.autoRenew.optional(),
  notes: contractFields.notes.default(''),
})
export type ContractInput = z.output<typeof contractSchema>

/** PATCH: exactly the fields sent change. */
export const contractUpdateSchema = updateSchema(contractFields)
export type ContractUpdateInput = z.output<typeof contractUpdateSchema>

export const CONTRACT_ACTIONS = ['activate', 'pause', 'resume', 'end', 'cancel', 'renew'] as const
export const contractActionSchema = z.object({
  action: z.enum(CONTRACT_ACTIONS, 'Choose activate, pause, resume, end, cancel or renew'),
  reason: text(500).default(''),
}).refine(a => !['cancel', 'pause'].includes(a.action) || a.reason.length > 0, { path: ['reason'], message: 'Say why' })
export type ContractAction = z.output<typeof contractActionSchema>

export const contractListQuery = pageQuery.extend({
  status: z.enum(CONTRACT_STATUSES).optional(),
  customerId: z.uuid().optional(),
  sort: z.enum(['termEnd', 'customer', 'plan', 'status']).default('termEnd'),
  dir: z.enum(['asc', 'desc']).default('asc'),
})
