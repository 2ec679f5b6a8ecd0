import { z } from 'zod'
import { CONTRACT_STATUSES } from '../types/schedule'
import { isLocalDate } from '../utils/recurrence'

export const localDate = z.string('Use a date like 2026-04-01').refine(isLocalDate, 'Use a date like 2026-04-01')

export const contractSchema = z.object({
  customerId: z.uuid('Choose a customer'),
  planId: z.uuid('Choose a plan'),
  featureIds: z.array(z.uuid('Not a valid feature id')).min(1, 'Choose at least one water feature').max(20),
  termStart: localDate,
  priceOverrideMinor: z.number('Price is a number').int('Price is in whole cents').min(0).max(100_000_000).nullish(),
  autoRenew: z.boolean().optional(),
  notes: z.string().trim().max(2000).default(''),
})
export type ContractInput = z.output<typeof contractSchema>

export const contractUpdateSchema = z.object({
  featureIds: z.array(z.uuid()).min(1, 'Choose at least one water feature').max(20).optional(),
  termStart: localDate.optional(),
  priceOverrideMinor: z.number().int().min(0).max(100_000_000).nullable().optional(),
  autoRenew: z.boolean().optional(),
  notes: z.string().trim().max(2000).optional(),
})
export type ContractUpdateInput = z.output<typeof contractUpdateSchema>

export const CONTRACT_ACTIONS = ['activate', 'pause', 'resume', 'end', 'cancel', 'renew'] as const
export const contractActionSchema = z.object({
  action: z.enum(CONTRACT_ACTIONS, 'Choose activate, pause, resume, end, cancel or renew'),
  reason: z.string().trim().max(500).default(''),
}).refine(a => !['cancel', 'pause'].includes(a.action) || a.reason.length > 0, { path: ['reason'], message: 'Say why' })
export type ContractAction = z.output<typeof contractActionSchema>

export const contractListQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
  q: z.string().trim().max(100).optional(),
  status: z.enum(CONTRACT_STATUSES).optional(),
  customerId: z.uuid().optional(),
  sort: z.enum(['termEnd', 'customer', 'plan', 'status']).default('termEnd'),
  dir: z.enum(['asc', 'desc']).default('asc'),
})
