// Billing: the closed sets shared by the schema, the API and the screens, and the shape an
// invoice is shown in (screen, e-mail and PDF all read `InvoiceDocument`).

/**
 * The one home of an invoice's states in our own words (what happened to the money): the stored
 * values, their labels and their pill colours, used by the pages, the PDF, the CSV and the e-mails.
 * `preparing`: being written, no number yet; `due`: issued with a number, waiting for the money
 * (shown "Overdue" past its due date, a label derived from the date, not a state); `paid`;
 * `cancelled`: raised in error and called off, keeps its number; `written_off`: given up on.
 * The payment provider's own names live only in its adapter (server/utils/payment-states.ts).
 */
export const INVOICE_STATUSES = ['preparing', 'due', 'paid', 'cancelled', 'written_off'] as const
export type InvoiceStatus = (typeof INVOICE_STATUSES)[number]
export const INVOICE_STATUS_LABELS: Record<InvoiceStatus, string> = {
  preparing: 'Being prepared', due: 'Due', paid: 'Paid', cancelled: 'Cancelled', written_off: 'Written off',
}
/** The label of a due invoice past its due date. */
export const INVOICE_OVERDUE_LABEL = 'Overdue'
/** The status pill's colours (the words always show too, never colour alone). */
export const INVOICE_STATUS_TONES: Record<InvoiceStatus | 'overdue', string> = {
  preparing: 'bg-stone-100 text-stone-700', due: 'bg-amber-100 text-amber-900', paid: 'bg-pond-100 text-pond-900',
  cancelled: 'bg-stone-200 text-stone-700', written_off: 'bg-stone-200 text-stone-800', overdue: 'bg-alert-50 text-alert-700 ring-1 ring-alert-500',
}
export function invoiceStatusLabel(status: InvoiceStatus, overdue = false): string {
  return overdue ? INVOICE_OVERDUE_LABEL : INVOICE_STATUS_LABELS[status]
}

/** What the owner can do to an invoice, in our words: issue (give it its number), send, record a payment, cancel, write off. */
export const INVOICE_ACTIONS = ['issue', 'send', 'cancel', 'write_off', 'record_payment'] as const
export type InvoiceActionName = (typeof INVOICE_ACTIONS)[number]
export const INVOICE_ACTION_LABELS: Record<InvoiceActionName, string> = {
  issue: 'Issue', send: 'Send', cancel: 'Cancel', write_off: 'Write off', record_payment: 'Record a payment',
}
/** The audit log's names for what happened to an invoice. */
export const INVOICE_AUDIT_ACTIONS: Record<InvoiceActionName, string> = {
  issue: 'invoice.issued', send: 'invoice.sent', cancel: 'invoice.cancelled', write_off: 'invoice.written_off', record_payment: 'invoice.payment_recorded',
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
  cheque: 'Cheque', bank_transfer: 'Bank transfer', cash: 'Cash', card: 'Online card payment',
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
