// Invoice and recurring-revenue arithmetic: pure and integer-only, shared by the server, the
// screens (a draft's totals as lines are typed) and the tests.
import { DateTime } from 'luxon'
import type { PaymentMismatch } from '../types/billing'
import type { BillingCadence } from '../types/schedule'
import { formatMoney } from './money'
import { addMonths, type LocalDate } from './company-time'

/**
 * n / d rounded to the nearest integer, halves away from zero (2.5 → 3, −2.5 → −3). Exact for
 * |n| < 2^53: the division is done on integers, never on a binary fraction.
 */
export function divRoundHalfAway(n: number, d: number): number {
  if (!Number.isSafeInteger(n) || !Number.isSafeInteger(d) || d <= 0) throw new RangeError('divRoundHalfAway needs safe integers and a positive divisor')
  const sign = n < 0 ? -1 : 1
  const a = Math.abs(n)
  const q = Math.floor(a / d)
  const r = a - q * d
  return sign * (2 * r >= d ? q + 1 : q)
}

/** Quantities carry at most two decimals (1.5 hours, 0.25 kg); held as hundredths to stay exact. */
export function quantityHundredths(quantity: number): number {
  return Math.round(quantity * 100)
}

/** A line's amount: quantity × unit price, rounded half away from zero to the minor unit. */
export function lineAmountMinor(quantity: number, unitPriceMinor: number): number {
  return divRoundHalfAway(quantityHundredths(quantity) * unitPriceMinor, 100)
}

export interface TotalsLine { quantity: number, unitPriceMinor: number, taxable: boolean }
export interface InvoiceTotals {
  lines: Array<{ amountMinor: number, taxable: boolean }>
  subtotalMinor: number
  taxableMinor: number
  taxMinor: number
  totalMinor: number
}

/**
 * Totals of an invoice. Tax is computed per taxable line at full precision — amount × rate in
 * basis points, an exact integer in ten-thousandths of a minor unit — the line taxes are added,
 * and the sum is rounded once, half away from zero, to the minor unit. Rounding once keeps the
 * tax within half a cent of rate × taxable subtotal however many lines there are (rounding each
 * line could drift by up to half a cent per line).
 */
export function invoiceTotals(lines: readonly TotalsLine[], taxRateBasisPoints: number): InvoiceTotals {
  const out = lines.map(l => ({ amountMinor: lineAmountMinor(l.quantity, l.unitPriceMinor), taxable: l.taxable }))
  const subtotalMinor = out.reduce((s, l) => s + l.amountMinor, 0)
  const taxableMinor = out.filter(l => l.taxable).reduce((s, l) => s + l.amountMinor, 0)
  const exactTax = out.filter(l => l.taxable).reduce((s, l) => s + l.amountMinor * taxRateBasisPoints, 0)
  const taxMinor = divRoundHalfAway(exactTax, 10_000)
  return { lines: out, subtotalMinor, taxableMinor, taxMinor, totalMinor: subtotalMinor + taxMinor }
}

/** 725 → "7.25 %", 800 → "8 %". */
export function formatTaxRate(basisPoints: number): string {
  return `${(basisPoints / 100).toFixed(2).replace(/\.?0+$/, '')} %`
}

const d = (iso: LocalDate) => DateTime.fromISO(iso, { zone: 'utc' })

// The date `months` after a date, kept to the month's end (Jan 31 + 1 → Feb 28): the company's calendar.

export interface BillingPeriod { start: LocalDate, end: LocalDate }

/** The monthly billing periods of a term: from the term start, one calendar month each, the last cut at the term end. */
export function monthlyPeriods(termStart: LocalDate, termEnd: LocalDate): BillingPeriod[] {
  const out: BillingPeriod[] = []
  for (let i = 0; i < 600; i++) {
    const start = addMonths(termStart, i)
    if (start > termEnd) break
    const next = addMonths(termStart, i + 1)
    const end = d(next).minus({ days: 1 }).toISODate()!
    out.push({ start, end: end > termEnd ? termEnd : end })
  }
  return out
}

/** Whole days from `a` to `b` (positive when b is later). */
export function daysBetween(a: LocalDate, b: LocalDate): number {
  return Math.round(d(b).diff(d(a), 'days').days)
}

/** Overdue reminders: the days after the due date each is sent, in order. */
export const REMINDER_DAYS = [7, 14, 30] as const

/** Which reminder stage an invoice has reached `daysOverdue` days after its due date (0 = none yet). */
export function reminderStageFor(daysOverdue: number): number {
  let stage = 0
  REMINDER_DAYS.forEach((day, i) => { if (daysOverdue >= day) stage = i + 1 })
  return stage
}

export const RECEIVABLE_BUCKETS = ['current', '1-30', '31-60', '61-90', '90+'] as const
export type ReceivableBucket = (typeof RECEIVABLE_BUCKETS)[number]

/** The ageing bucket of an unpaid invoice: `current` until its due date has passed. */
export function receivableBucket(daysPastDue: number): ReceivableBucket {
  if (daysPastDue <= 0) return 'current'
  if (daysPastDue <= 30) return '1-30'
  if (daysPastDue <= 60) return '31-60'
  if (daysPastDue <= 90) return '61-90'
  return '90+'
}

/**
 * What one contract adds to monthly recurring revenue, in minor units (unrounded: callers sum,
 * then round once). Yearly and other whole-term prices spread evenly over the term's months
 * (price / 12 for a year); monthly plans count their monthly price; per-visit plans count the
 * per-visit price × the visits planned in the term, spread over the term's months.
 */
export function monthlyValueMinor(c: { cadence: BillingCadence, priceMinor: number, termMonths: number, plannedVisits: number }): number {
  switch (c.cadence) {
    case 'yearly': return c.priceMinor / c.termMonths
    case 'monthly': return c.priceMinor
    case 'per_visit': return (c.priceMinor * c.plannedVisits) / c.termMonths
  }
}

/** A term is renewed this many days before the next term would start. */
export const RENEWAL_LEAD_DAYS = 30
/** A yearly term's invoice is raised this many days before the term starts (at once for a term under way). */
export const TERM_INVOICE_LEAD_DAYS = 30

/** The owner's words for an online payment that did not match what was due (invoice page, home). */
export function describePaymentMismatch(m: PaymentMismatch, currency: string): string {
  const due = formatMoney(m.dueMinor, currency)
  if (m.paidMinor === null) return `The payment provider reported this invoice paid without saying how much; ${due} was due. Nothing was counted: check the payment with the provider, then record it.`
  const paid = formatMoney(m.paidMinor, m.paidCurrency)
  if (m.paidCurrency !== currency) return `The payment provider took ${paid}, not in the invoice's currency; ${due} was due. Nothing was counted: check the payment with the provider, then record it.`
  if (m.countedMinor > 0) return `The payment provider took ${paid}, but ${due} was due. ${paid} is counted as paid and ${formatMoney(m.dueMinor - m.countedMinor, currency)} is still due: collect the rest or write it off.`
  return `The payment provider took ${paid}, but ${due} was due. Nothing was counted: check the payment with the provider (refund any difference), then record it.`
}
