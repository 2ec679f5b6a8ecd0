import Stripe from 'stripe'
import { providerAction, stateFromProvider, type ClosingState } from './payment-states'

/**
 * The only place that talks to the payment provider, through its official SDK.
 *
 * STRIPE_SECRET_KEY — the account's secret key. STRIPE_WEBHOOK_SECRET — the signing secret of the
 * webhook endpoint (POST /api/webhooks/payments). STRIPE_API_URL — set only to point the SDK at
 * another server, e.g. http://127.0.0.1:12111 for the local payment fake that `npm start` and the
 * tests run; leave it unset for the real service.
 */
let client: Stripe | undefined

export class PaymentsNotConfiguredError extends Error {}

export function paymentsConfigured(): boolean {
  return Boolean(process.env.STRIPE_SECRET_KEY)
}

export function usePayments(): Stripe {
  if (client) return client
  const key = process.env.STRIPE_SECRET_KEY
  if (!key) throw new PaymentsNotConfiguredError('Online payments are not configured (STRIPE_SECRET_KEY)')
  const override = process.env.STRIPE_API_URL ? new URL(process.env.STRIPE_API_URL) : null
  client = new Stripe(key, {
    telemetry: false,
    // Retries would hide an outage from the caller; the billing task retries on its next run.
    maxNetworkRetries: 0,
    timeout: 15_000,
    ...(override
      ? { host: override.hostname, port: Number(override.port || (override.protocol === 'https:' ? 443 : 80)), protocol: override.protocol.replace(':', '') as 'http' | 'https' }
      : {}),
  })
  return client
}

/** Verifies a webhook delivery's signature and parses it; throws when the signature does not match. */
export function verifyWebhook(payload: string, signature: string): Stripe.Event {
  const secret = process.env.STRIPE_WEBHOOK_SECRET
  if (!secret) throw new PaymentsNotConfiguredError('The webhook signing secret is not configured (STRIPE_WEBHOOK_SECRET)')
  return Stripe.webhooks.constructEvent(payload, signature, secret)
}

/**
 * Closes the provider's copy of an invoice as the owner closed ours (`to`), so its payment page
 * stops asking for money: 'removed' when it was never issued there (the unfinished copy is deleted),
 * 'unchanged' when it was no longer waiting for money there, 'closed' otherwise.
 */
export async function closeOnProvider(ref: string, to: ClosingState, idempotencyKey: string): Promise<'removed' | 'unchanged' | 'closed'> {
  const stripe = usePayments()
  const remote = await stripe.invoices.retrieve(ref)
  const theirs = stateFromProvider(remote.status)
  if (theirs === 'preparing') {
    await stripe.invoices.del(ref).catch(() => {})
    return 'removed'
  }
  if (theirs !== 'due') return 'unchanged'
  const action = providerAction(to)
  if (action === 'void') await stripe.invoices.voidInvoice(ref, {}, { idempotencyKey })
  else if (action === 'mark_uncollectible') await stripe.invoices.markUncollectible(ref, {}, { idempotencyKey })
  else await stripe.invoices.pay(ref, { paid_out_of_band: true }, { idempotencyKey })
  return 'closed'
}

/** What the service needs to know of the provider's copy of an invoice. */
export interface ProviderInvoice { state: ReturnType<typeof stateFromProvider>, amountDueMinor: number, hostedUrl: string | null }
const asProviderInvoice = (remote: Stripe.Invoice): ProviderInvoice =>
  ({ state: stateFromProvider(remote.status), amountDueMinor: remote.amount_due, hostedUrl: remote.hosted_invoice_url ?? null })

/** The provider's customer for one of ours; returns its reference. */
export async function createProviderCustomer(customer: { id: string, name: string, email: string | undefined }, idempotencyKey: string): Promise<string> {
  const made = await usePayments().customers.create({ name: customer.name, email: customer.email, metadata: { rillbook_customer_id: customer.id } }, { idempotencyKey })
  return made.id
}

/** An empty invoice to be paid on the provider's hosted page by its due date; returns its reference. */
export async function createProviderInvoice(invoice: { id: string, number: string, customerRef: string, dueDate: string, currency: string, returnUrl: string }, idempotencyKey: string): Promise<string> {
  const made = await usePayments().invoices.create({
    customer: invoice.customerRef, collection_method: 'send_invoice', due_date: Math.floor(new Date(`${invoice.dueDate}T23:59:59Z`).getTime() / 1000),
    currency: invoice.currency.toLowerCase(), auto_advance: false, description: `Invoice ${invoice.number}`,
    metadata: { rillbook_invoice_id: invoice.id, rillbook_number: invoice.number, return_url: invoice.returnUrl },
  }, { idempotencyKey })
  return made.id
}

export async function providerInvoice(ref: string): Promise<ProviderInvoice> {
  return asProviderInvoice(await usePayments().invoices.retrieve(ref))
}

/** Adds the lines (each with its own idempotency key) to an invoice still being prepared there, then issues it. */
export async function issueProviderInvoice(ref: string, customerRef: string, currency: string, lines: Array<{ amountMinor: number, description: string, idempotencyKey: string }>, idempotencyKey: string): Promise<ProviderInvoice> {
  const stripe = usePayments()
  for (const l of lines) {
    await stripe.invoiceItems.create({ customer: customerRef, invoice: ref, amount: l.amountMinor, currency: currency.toLowerCase(), description: l.description }, { idempotencyKey: l.idempotencyKey })
  }
  return asProviderInvoice(await stripe.invoices.finalizeInvoice(ref, {}, { idempotencyKey }))
}

/** The app's public address, for links in e-mails and the return link from the payment page. */
export function publicAppUrl(): string {
  return (process.env.RILLBOOK_PUBLIC_URL || process.env.AUTH_ORIGIN || `http://127.0.0.1:${process.env.PORT || process.env.NITRO_PORT || 3000}`).replace(/\/$/, '')
}

export type { Stripe }
