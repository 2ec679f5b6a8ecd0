import { z } from 'zod'
import { INVOICE_STATUSES, LINE_KINDS, OFFLINE_PAYMENT_METHODS } from '../types/billing'
import { localDate } from './contracts'

export const invoiceLineSchema = z.object({
  kind: z.enum(LINE_KINDS, 'Choose what the line is for'),
  description: z.string().trim().min(1, 'Describe the line').max(300, 'Use at most 300 characters'),
  quantity: z.number('Quantity is a number').positive('Quantity must be more than zero').max(100_000, 'Quantity is not plausible')
    .refine(q => Math.abs(Math.round(q * 100) - q * 100) < 1e-6, 'Use at most two decimals'),
  unitPriceMinor: z.number('Unit price is a number').int('Unit price is in whole cents').min(-100_000_000).max(100_000_000, 'Unit price is not plausible'),
  taxable: z.boolean().default(true),
}).refine(l => l.kind === 'discount' ? l.unitPriceMinor <= 0 : l.unitPriceMinor >= 0, {
  path: ['unitPriceMinor'], message: 'Only a discount line has a negative price (and a discount cannot be positive)',
})
export type InvoiceLineInput = z.output<typeof invoiceLineSchema>

const lines = z.array(invoiceLineSchema).min(1, 'An invoice needs at least one line').max(200, 'At most 200 lines')

export const invoiceCreateSchema = z.object({
  customerId: z.uuid('Choose a customer'),
  contractId: z.uuid('Not a valid contract').nullish(),
  lines,
  notes: z.string().trim().max(2000).default(''),
  periodStart: localDate.nullish(),
  periodEnd: localDate.nullish(),
}).refine(i => !i.periodStart || !i.periodEnd || i.periodStart <= i.periodEnd, { path: ['periodEnd'], message: 'The period ends before it starts' })
export type InvoiceCreateInput = z.output<typeof invoiceCreateSchema>

export const invoiceUpdateSchema = z.object({
  lines: lines.optional(),
  notes: z.string().trim().max(2000).optional(),
})
export type InvoiceUpdateInput = z.output<typeof invoiceUpdateSchema>

export const INVOICE_ACTIONS = ['finalize', 'send', 'void', 'mark_uncollectible', 'record_payment'] as const
export type InvoiceActionName = (typeof INVOICE_ACTIONS)[number]
export const invoiceActionSchema = z.discriminatedUnion('action', [
  z.object({ action: z.literal('finalize') }),
  z.object({ action: z.literal('send') }),
  z.object({ action: z.literal('void'), reason: z.string().trim().min(1, 'Say why').max(500) }),
  z.object({ action: z.literal('mark_uncollectible'), reason: z.string().trim().min(1, 'Say why').max(500) }),
  z.object({
    action: z.literal('record_payment'),
    method: z.enum(OFFLINE_PAYMENT_METHODS, 'Choose cheque, bank transfer or cash'),
    reference: z.string().trim().max(120).default(''),
    paidOn: localDate,
  }),
], 'Choose finalize, send, void, mark_uncollectible or record_payment')
export type InvoiceAction = z.output<typeof invoiceActionSchema>

export const INVOICE_SORTS = ['number', 'issueDate', 'dueDate', 'total', 'status', 'customer'] as const
export const invoiceListQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
  q: z.string().trim().max(100).optional(),
  status: z.enum([...INVOICE_STATUSES, 'overdue'], 'Use draft, open, overdue, paid, void or uncollectible').optional(),
  customerId: z.uuid('Not a valid customer id').optional(),
  contractId: z.uuid('Not a valid contract id').optional(),
  from: localDate.optional(),
  to: localDate.optional(),
  sort: z.enum(INVOICE_SORTS, `Sort by one of: ${INVOICE_SORTS.join(', ')}`).default('issueDate'),
  dir: z.enum(['asc', 'desc'], 'Use asc or desc').default('desc'),
})
export type InvoiceListQuery = z.output<typeof invoiceListQuery>
export const invoiceExportQuery = invoiceListQuery.omit({ page: true, pageSize: true })

export const revenueQuery = z.object({
  asOf: localDate.optional(),
})
