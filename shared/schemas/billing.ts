import { z } from 'zod'
import { INVOICE_STATUSES, LINE_KINDS, OFFLINE_PAYMENT_METHODS } from '../types/billing'
import { pageQuery } from './common'
import { localDate, MONEY_MAX_MINOR, moneyMinor, text, updateSchema } from './fields'

export const invoiceLineSchema = z.object({
  kind: z.enum(LINE_KINDS, 'Choose what the line is for'),
  description: text(300, 'Describe the line'),
  quantity: z.number('Quantity is a number').positive('Quantity must be more than zero').max(100_000, 'Quantity is not plausible')
    .refine(q => Math.abs(Math.round(q * 100) - q * 100) < 1e-6, 'Use at most two decimals'),
  unitPriceMinor: moneyMinor('Unit price', { min: -100_000_000, max: 100_000_000 }),
  taxable: z.boolean().default(true),
}).refine(l => l.kind === 'discount' ? l.unitPriceMinor <= 0 : l.unitPriceMinor >= 0, {
  path: ['unitPriceMinor'], message: 'Only a discount line has a negative price (and a discount cannot be positive)',
}).refine(l => Math.abs(l.quantity * l.unitPriceMinor) <= MONEY_MAX_MINOR, {
  path: ['unitPriceMinor'], message: 'This line\'s amount (quantity × unit price) is more than an invoice can hold; split the work over several invoices',
})
export type InvoiceLineInput = z.output<typeof invoiceLineSchema>

/** Half the column's range: room for tax of up to 50 % on top of the lines (the total is checked again with the real rate). */
export const MAX_LINES_TOTAL_MINOR = Math.floor(MONEY_MAX_MINOR / 1.5)

const lines = z.array(invoiceLineSchema).min(1, 'An invoice needs at least one line').max(200, 'At most 200 lines')
  .refine(ls => ls.reduce((sum, l) => sum + Math.abs(l.quantity * l.unitPriceMinor), 0) <= MAX_LINES_TOTAL_MINOR, {
    message: 'The lines add up to more than an invoice can hold; split them over several invoices',
  })

export const invoiceCreateSchema = z.object({
  customerId: z.uuid('Choose a customer'),
  contractId: z.uuid('Not a valid contract').nullish(),
  lines,
  notes: text(2000).default(''),
  periodStart: localDate.nullish(),
  periodEnd: localDate.nullish(),
}).refine(i => !i.periodStart || !i.periodEnd || i.periodStart <= i.periodEnd, { path: ['periodEnd'], message: 'The period ends before it starts' })
export type InvoiceCreateInput = z.output<typeof invoiceCreateSchema>

/** PATCH of an invoice being prepared: the lines (the whole list) and the notes, each only when sent. */
export const invoiceUpdateSchema = updateSchema({ lines, notes: text(2000) })
export type InvoiceUpdateInput = z.output<typeof invoiceUpdateSchema>

export const invoiceActionSchema = z.discriminatedUnion('action', [
  z.object({ action: z.literal('issue') }),
  z.object({ action: z.literal('send') }),
  z.object({ action: z.literal('cancel'), reason: text(500, 'Say why') }),
  z.object({ action: z.literal('write_off'), reason: text(500, 'Say why') }),
  z.object({
    action: z.literal('record_payment'),
    method: z.enum(OFFLINE_PAYMENT_METHODS, 'Choose cheque, bank transfer or cash'),
    reference: text(120).default(''),
    paidOn: localDate,
  }),
], 'Choose issue, send, cancel, write_off or record_payment')
export type InvoiceAction = z.output<typeof invoiceActionSchema>

export const INVOICE_SORTS = ['number', 'issueDate', 'dueDate', 'total', 'status', 'customer'] as const
export const invoiceListQuery = pageQuery.extend({
  status: z.enum([...INVOICE_STATUSES, 'overdue'], 'Use preparing, due, overdue, paid, cancelled or written_off').optional(),
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
