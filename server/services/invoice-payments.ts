import { and, asc, eq } from 'drizzle-orm'
import { customers, invoiceLines, invoices, paymentEvents } from '../db/schema'
import { formatTaxRate } from '../../shared/utils/billing'
import { INVOICE_AUDIT_ACTIONS, INVOICE_STATUS_LABELS, type PaymentMismatch } from '../../shared/types/billing'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { closeOnProvider, createProviderCustomer, createProviderInvoice, issueProviderInvoice, paymentsConfigured, providerInvoice, publicAppUrl, type Stripe } from '../utils/payments'
import { stateFromEvent, type ClosingState } from '../utils/payment-states'
import { recordAudit } from './audit'
import { loadInvoice, queueInvoiceMail } from './invoices'
import { contactEmails } from './recipients'

type InvoiceRow = typeof invoices.$inferSelect

/** Every provider call carries a key made from our own ids, so a retried step never acts twice. */
const key = (...parts: string[]) => `rillbook-${parts.join('-')}`

function describe(err: unknown) {
  return err instanceof Error ? err.message : String(err)
}

/**
 * Makes the provider's copy of a due invoice: its customer (once per customer), the invoice with
 * its lines and the tax as one more line, finalized there so it has a hosted payment page. Each
 * step is saved as soon as it is done and each call has an idempotency key, so a run killed half
 * way picks up where it stopped without making anything twice. A failure is written on the
 * invoice (`providerError`) and returned; the billing task tries again on its next run.
 */
export async function syncInvoiceToProvider(invoiceId: string): Promise<{ ok: true, url: string | null } | { ok: false, error: string }> {
  const db = useDb()
  const [inv] = await db.select().from(invoices).where(eq(invoices.id, invoiceId)).limit(1)
  if (!inv || inv.status !== 'due') return { ok: true, url: inv?.providerHostedUrl ?? null }
  if (inv.providerSyncedAt) return { ok: true, url: inv.providerHostedUrl }
  if (!paymentsConfigured()) return { ok: false, error: 'Online payments are not configured' }
  try {
    const [cu] = await db.select().from(customers).where(eq(customers.id, inv.customerId)).limit(1)
    let customerRef = cu!.paymentCustomerId
    if (!customerRef) {
      const [email] = await contactEmails(db, cu!.id, 'invoices')
      customerRef = await createProviderCustomer({ id: cu!.id, name: cu!.name, email }, key('customer', cu!.id))
      await db.update(customers).set({ paymentCustomerId: customerRef }).where(eq(customers.id, cu!.id))
    }
    let ref = inv.providerInvoiceId
    if (!ref) {
      ref = await createProviderInvoice({
        id: inv.id, number: inv.number!, customerRef, dueDate: inv.dueDate!, currency: inv.currency, returnUrl: `${publicAppUrl()}/portal/invoices/${inv.id}?paid=1`,
      }, key('invoice', inv.id))
      await db.update(invoices).set({ providerInvoiceId: ref }).where(eq(invoices.id, inv.id))
    }
    let remote = await providerInvoice(ref)
    if (remote.state === 'preparing') {
      const lines = await db.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, inv.id)).orderBy(asc(invoiceLines.position))
      const items = lines.map(l => ({ amountMinor: l.amountMinor, description: l.quantity === 1 ? l.description : `${l.description} (× ${l.quantity})`, idempotencyKey: key('line', l.id) }))
      if (inv.taxMinor !== 0) items.push({ amountMinor: inv.taxMinor, description: `Sales tax (${formatTaxRate(inv.taxRateBasisPoints)})`, idempotencyKey: key('tax', inv.id) })
      remote = await issueProviderInvoice(ref, customerRef, inv.currency, items, key('finalize', inv.id))
    }
    if (remote.amountDueMinor !== inv.totalMinor - inv.amountPaidMinor && remote.state === 'due') {
      throw new Error(`The provider's copy asks for ${remote.amountDueMinor} but the invoice is for ${inv.totalMinor - inv.amountPaidMinor}`)
    }
    await db.update(invoices).set({ providerHostedUrl: remote.hostedUrl, providerSyncedAt: new Date(), providerError: null }).where(eq(invoices.id, inv.id))
    return { ok: true, url: remote.hostedUrl }
  }
  catch (err) {
    const error = describe(err)
    await db.update(invoices).set({ providerError: error.slice(0, 500) }).where(eq(invoices.id, invoiceId)).catch(() => {})
    return { ok: false, error }
  }
}

/**
 * Tells the provider about a cancellation, a write-off or a payment taken offline, so its payment
 * page stops asking for money. Throws 503 when the provider cannot be reached (nothing is changed).
 */
export async function mirrorOnProvider(inv: InvoiceRow, to: ClosingState) {
  if (!inv.providerInvoiceId) return
  try {
    const r = await closeOnProvider(inv.providerInvoiceId, to, key(to, inv.id))
    // Never issued there: nobody could pay it, and the provider's copy is gone.
    if (r === 'removed') await useDb().update(invoices).set({ providerInvoiceId: null }).where(eq(invoices.id, inv.id))
  }
  catch (err) {
    throw httpError(503, `The payment service could not be reached, so nothing was changed; try again in a few minutes (${describe(err)})`)
  }
}

/** The provider's payment page for a due invoice of the caller's (made now when it is missing). */
export async function paymentPageUrl(actor: SessionUser, invoiceId: string) {
  const inv = await loadInvoice(actor, invoiceId)
  if (inv.status !== 'due') throw httpError(409, `This invoice is ${INVOICE_STATUS_LABELS[inv.status].toLowerCase()}; there is nothing to pay`)
  const r = await syncInvoiceToProvider(inv.id)
  if (!r.ok || !r.url) throw httpError(503, 'Online payment is not available right now; try again in a few minutes or pay by cheque or bank transfer')
  return { url: r.url }
}

type EventOutcome = 'applied' | 'duplicate' | `ignored: ${string}` | `recorded: ${string}`

/** The event's invoice, locked for the rest of the transaction (two events for one invoice apply in turn). */
async function findInvoice(tx: Tx, obj: { id?: string, metadata?: Record<string, string> | null }) {
  const ours = obj.metadata?.rillbook_invoice_id
  const byRef = obj.id ? await tx.select().from(invoices).where(eq(invoices.providerInvoiceId, obj.id)).limit(1).for('update') : []
  if (byRef[0]) return byRef[0]
  if (ours && /^[0-9a-f-]{36}$/i.test(ours)) {
    const [row] = await tx.select().from(invoices).where(eq(invoices.id, ours)).limit(1).for('update')
    return row ?? null
  }
  return null
}

/**
 * Applies one verified provider event, once: the event id is stored in the same transaction as
 * its effect, so a repeat (or a concurrent duplicate) changes nothing. Events that arrive out of
 * order cannot undo a later state: a failure after a payment is recorded and ignored.
 */
export async function applyPaymentEvent(event: Stripe.Event): Promise<{ outcome: EventOutcome, invoiceId: string | null }> {
  return useDb().transaction(async (tx) => {
    const obj = (event.data?.object ?? {}) as { object?: string, id?: string, metadata?: Record<string, string>, amount_paid?: number, currency?: string, status_transitions?: { paid_at?: number | null }, last_payment_error?: { message?: string } | null }
    const [claimed] = await tx.insert(paymentEvents).values({ id: event.id, type: event.type, outcome: 'pending', payload: event as unknown as Record<string, unknown> })
      .onConflictDoNothing().returning({ id: paymentEvents.id })
    if (!claimed) return { outcome: 'duplicate' as const, invoiceId: null }
    const done = async (outcome: EventOutcome, invoiceId: string | null) => {
      await tx.update(paymentEvents).set({ outcome, invoiceId }).where(eq(paymentEvents.id, event.id))
      return { outcome, invoiceId }
    }
    if (obj.object !== 'invoice') return done('ignored: not about an invoice', null)
    const inv = await findInvoice(tx, obj)
    if (!inv) return done('ignored: no such invoice here', null)
    const audit = (action: string, detail: Record<string, unknown>) => recordAudit(tx, { action, companyId: inv.companyId, subjectType: 'invoice', subjectId: inv.id, detail: { eventId: event.id, ...detail } })
    switch (event.type) {
      case 'invoice.paid': {
        if (inv.status === 'paid') return done('ignored: already paid', inv.id)
        // Our own "paid offline" told to the provider: the owner's action records it, not this event.
        if ((obj as { paid_out_of_band?: boolean }).paid_out_of_band) return done('ignored: paid offline, recorded by the owner', inv.id)
        if (inv.status !== 'due') {
          await audit('invoice.paid_while_closed', { status: inv.status })
          return done(`ignored: invoice is ${inv.status}; refund or reopen it by hand`, inv.id)
        }
        // Paid in full only when the provider took exactly what is due, in the invoice's currency.
        // Anything else is recorded for the owner and the invoice stays open (an underpayment
        // counts towards what is paid; an overpayment or another currency counts nothing).
        const due = inv.totalMinor - inv.amountPaidMinor
        const paid = Number.isSafeInteger(obj.amount_paid) ? obj.amount_paid! : null
        const paidCurrency = typeof obj.currency === 'string' && obj.currency ? obj.currency.toUpperCase() : inv.currency
        if (paid !== due || paidCurrency !== inv.currency) {
          const counted = paidCurrency === inv.currency && paid !== null && paid > 0 && paid < due ? paid : 0
          const mismatch: PaymentMismatch = { eventId: event.id, paidMinor: paid, paidCurrency, dueMinor: due, countedMinor: counted, at: new Date().toISOString() }
          await tx.update(invoices).set({ amountPaidMinor: inv.amountPaidMinor + counted, paymentMismatch: mismatch })
            .where(and(eq(invoices.id, inv.id), eq(invoices.status, 'due')))
          await audit('invoice.paid_amount_mismatch', { paid, paidCurrency, due, counted })
          return done('recorded: the amount paid does not match what is due; left due for the owner', inv.id)
        }
        const paidAt = obj.status_transitions?.paid_at ? new Date(obj.status_transitions.paid_at * 1000) : new Date()
        await tx.update(invoices).set({ status: 'paid', paidAt, amountPaidMinor: inv.totalMinor, paymentMethod: 'card', lastPaymentError: null })
          .where(and(eq(invoices.id, inv.id), eq(invoices.status, 'due')))
        await queueInvoiceMail(tx, inv.id, 'receipt', `invoice:${inv.id}:receipt`)
        await audit('invoice.paid_online', { amount: obj.amount_paid })
        return done('applied', inv.id)
      }
      case 'invoice.payment_failed': {
        if (inv.status !== 'due') return done(`ignored: invoice is ${inv.status}`, inv.id)
        const message = obj.last_payment_error?.message ?? 'The payment did not go through'
        await tx.update(invoices).set({ lastPaymentError: message }).where(eq(invoices.id, inv.id))
        await audit('invoice.payment_failed', { message })
        return done('applied', inv.id)
      }
      default: {
        const to = stateFromEvent(event.type)
        if (to !== 'cancelled' && to !== 'written_off') return done('ignored: not used', inv.id)
        if (inv.status !== 'due') return done(`ignored: invoice is ${inv.status}`, inv.id)
        const now = new Date()
        await tx.update(invoices).set(to === 'cancelled' ? { status: to, cancelledAt: now } : { status: to, writtenOffAt: now })
          .where(and(eq(invoices.id, inv.id), eq(invoices.status, 'due')))
        await audit(to === 'cancelled' ? INVOICE_AUDIT_ACTIONS.cancel : INVOICE_AUDIT_ACTIONS.write_off, { by: 'payment provider' })
        return done('applied', inv.id)
      }
    }
  })
}
