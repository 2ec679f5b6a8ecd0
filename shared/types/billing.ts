// Billing: the closed sets shared by the schema, the API and the screens, and the shape an
// invoice is shown in (screen, e-mail and PDF all read `InvoiceDocument`).

export const INVOICE_STATUSES = ['draft', 'open', 'paid', 'void', 'uncollectible'] as const
export type InvoiceStatus = (typeof INVOICE_STATUSES)[number]
export const INVOICE_STATUS_LABELS: Record<InvoiceStatus, string> = {
  draft: 'Draft', open: 'Open', paid: 'Paid', void: 'Void', uncollectible: 'Uncollectible',
}

/** Where an invoice came from: a contract's cadence (term, month, finished visit) or the owner by hand. */
export const INVOICE_SOURCES = ['contract_term', 'contract_month', 'visit', 'manual'] as const
export type InvoiceSource = (typeof INVOICE_SOURCES)[number]

export const LINE_KINDS = ['plan', 'visit', 'extra_visit', 'part', 'treatment', 'labour', 'discount', 'other'] as const
export type LineKind = (typeof LINE_KINDS)[number]
export const LINE_KIND_LABELS: Record<LineKind, string> = {
  plan: 'Plan', visit: 'Visit', extra_visit: 'Extra visit', part: 'Part', treatment: 'Treatment',
  labour: 'Labour', discount: 'Discount', other: 'Other',
}

export const OFFLINE_PAYMENT_METHODS = ['cheque', 'bank_transfer', 'cash'] as const
export type OfflinePaymentMethod = (typeof OFFLINE_PAYMENT_METHODS)[number]
export const PAYMENT_METHOD_LABELS: Record<OfflinePaymentMethod | 'card', string> = {
  cheque: 'Cheque', bank_transfer: 'Bank transfer', cash: 'Cash', card: 'Card (online)',
}

/**
 * An online payment whose amount did not match what was due (`invoice.paid` from the provider):
 * the invoice is not marked paid; the owner sees this and resolves it. `countedMinor` is what was
 * added to the amount paid (an underpayment in the invoice's currency; nothing otherwise).
 */
export interface PaymentMismatch {
  eventId: string
  /** What the provider says was paid, in `paidCurrency`; null when the event did not say. */
  paidMinor: number | null
  paidCurrency: string
  /** What was due on the invoice when the event arrived, in the invoice's currency. */
  dueMinor: number
  countedMinor: number
  /** When it was recorded (ISO timestamp). */
  at: string
}

/** Everything needed to show or print one invoice. Money in integer minor units of `currency`. */
export interface InvoiceDocument {
  number: string | null
  status: InvoiceStatus
  currency: string
  issueDate: string | null
  dueDate: string | null
  periodStart: string | null
  periodEnd: string | null
  company: { name: string, addressLines: string[], email: string | null }
  customer: { name: string, addressLines: string[] }
  lines: Array<{ description: string, quantity: number, unitPriceMinor: number, amountMinor: number, taxable: boolean }>
  subtotalMinor: number
  /** Tax rate in basis points (725 = 7.25 %) and the tax, rounded once for the whole invoice. */
  taxRateBasisPoints: number
  taxMinor: number
  totalMinor: number
  amountPaidMinor: number
  amountDueMinor: number
  /** Company-local date it was paid. */
  paidAt: string | null
  paymentNote: string | null
  notes: string
}
