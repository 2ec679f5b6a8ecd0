import type { InvoiceStatus } from '../../shared/types/billing'

/**
 * The payment provider's invoice words, mapped to ours in ONE table, both directions. Part of the
 * payments adapter: nothing outside server/utils/payment*.ts (and the local payment fake, which
 * mimics the provider) names the provider's states, actions or events.
 *
 * - `provider`: the provider's status that corresponds to each state of ours.
 * - `event`: the provider event that brings an invoice to this state (null: none does; a paid
 *   event goes through the amount checks in invoice-payments).
 * - `action`: what to ask of the provider when the owner moves an invoice to this state itself.
 */
export const PAYMENT_STATES = {
  preparing: { provider: 'draft', event: null, action: null },
  due: { provider: 'open', event: null, action: null },
  paid: { provider: 'paid', event: 'invoice.paid', action: 'pay_out_of_band' },
  cancelled: { provider: 'void', event: 'invoice.voided', action: 'void' },
  written_off: { provider: 'uncollectible', event: 'invoice.marked_uncollectible', action: 'mark_uncollectible' },
} as const satisfies Record<InvoiceStatus, { provider: string, event: string | null, action: string | null }>

export type ProviderStatus = (typeof PAYMENT_STATES)[InvoiceStatus]['provider']
export type ProviderAction = NonNullable<(typeof PAYMENT_STATES)[InvoiceStatus]['action']>
/** The states of ours the owner can close an invoice to, which the provider is told about. */
export type ClosingState = { [S in InvoiceStatus]: (typeof PAYMENT_STATES)[S]['action'] extends null ? never : S }[InvoiceStatus]

const entries = Object.entries(PAYMENT_STATES) as Array<[InvoiceStatus, (typeof PAYMENT_STATES)[InvoiceStatus]]>

/** Ours for the provider's status (null for a status the provider has that we do not use). */
export function stateFromProvider(status: string | null | undefined): InvoiceStatus | null {
  return entries.find(([, p]) => p.provider === status)?.[0] ?? null
}

/** The provider's status for a state of ours. */
export function providerStatus(state: InvoiceStatus): ProviderStatus {
  return PAYMENT_STATES[state].provider
}

/** Ours for a provider event that moves an invoice (null for events that do not). */
export function stateFromEvent(type: string): InvoiceStatus | null {
  return entries.find(([, p]) => p.event === type)?.[0] ?? null
}

/** The provider action that mirrors closing an invoice to this state of ours. */
export function providerAction(state: ClosingState): ProviderAction {
  return PAYMENT_STATES[state].action
}
