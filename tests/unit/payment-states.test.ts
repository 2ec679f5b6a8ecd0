import { describe, expect, it } from 'vitest'
import { INVOICE_STATUS_LABELS, INVOICE_STATUS_TONES, INVOICE_STATUSES, invoiceStatusLabel } from '../../shared/types/billing'
import { PAYMENT_STATES, providerAction, providerStatus, stateFromEvent, stateFromProvider } from '../../server/utils/payment-states'

describe('the payment provider\'s states, mapped to ours in one table', () => {
  it('round-trips every state of ours through the provider\'s status', () => {
    for (const s of INVOICE_STATUSES) expect(stateFromProvider(providerStatus(s))).toBe(s)
    // One provider status per state of ours, none shared.
    expect(new Set(INVOICE_STATUSES.map(providerStatus)).size).toBe(INVOICE_STATUSES.length)
    expect(Object.keys(PAYMENT_STATES).sort()).toEqual([...INVOICE_STATUSES].sort())
  })

  it('reads each provider status and event the webhooks bring as the right state of ours', () => {
    expect(stateFromProvider('draft')).toBe('preparing')
    expect(stateFromProvider('open')).toBe('due')
    expect(stateFromProvider('paid')).toBe('paid')
    expect(stateFromProvider('void')).toBe('cancelled')
    expect(stateFromProvider('uncollectible')).toBe('written_off')
    expect(stateFromProvider('deleted')).toBeNull()
    expect(stateFromProvider(null)).toBeNull()
    expect(stateFromEvent('invoice.paid')).toBe('paid')
    expect(stateFromEvent('invoice.voided')).toBe('cancelled')
    expect(stateFromEvent('invoice.marked_uncollectible')).toBe('written_off')
    // Events that do not move an invoice to another state.
    for (const e of ['invoice.payment_failed', 'invoice.finalized', 'invoice.sent', 'customer.created']) expect(stateFromEvent(e)).toBeNull()
  })

  it('asks the provider for the action that matches each way the owner closes an invoice', () => {
    expect(providerAction('cancelled')).toBe('void')
    expect(providerAction('written_off')).toBe('mark_uncollectible')
    expect(providerAction('paid')).toBe('pay_out_of_band')
  })

  it('gives every state of ours a label and a colour, none of them the provider\'s words', () => {
    for (const s of INVOICE_STATUSES) {
      expect(INVOICE_STATUS_LABELS[s]).toBeTruthy()
      expect(INVOICE_STATUS_TONES[s]).toMatch(/^bg-/)
      expect(INVOICE_STATUS_LABELS[s]).not.toMatch(/\b(draft|open|void|uncollectible)\b/i)
    }
    expect(invoiceStatusLabel('due', true)).toBe('Overdue')
    expect(invoiceStatusLabel('due')).toBe('Due')
  })
})
