import { and, eq, inArray } from 'drizzle-orm'
import type { InvoiceAction } from '../../shared/schemas/billing'
import { INVOICE_STATUS_LABELS } from '../../shared/types/billing'
import { invoices } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { mirrorOnProvider, syncInvoiceToProvider } from './invoice-payments'
import { finalizeInTx, getInvoice, loadInvoice, queueInvoiceMail, sendInTx } from './invoices'

type InvoiceRow = typeof invoices.$inferSelect

/** What an action may start from. */
const ALLOWED: Record<InvoiceAction['action'], InvoiceRow['status'][]> = {
  finalize: ['draft'],
  send: ['open'],
  void: ['draft', 'open'],
  mark_uncollectible: ['open'],
  record_payment: ['open'],
}

/**
 * The owner's invoice actions. Provider calls (void, uncollectible, paid out of band) happen
 * before the database changes, so a provider outage leaves the invoice as it was (503) instead
 * of the two disagreeing; `finalize` writes first and syncs after (a failed sync is retried).
 */
export async function actOnInvoice(actor: SessionUser, id: string, act: InvoiceAction, ip: string) {
  const inv = await loadInvoice(actor, id)
  if (!ALLOWED[act.action].includes(inv.status)) throw httpError(409, `A ${INVOICE_STATUS_LABELS[inv.status].toLowerCase()} invoice cannot ${act.action.replace(/_/g, ' ')}; allowed from: ${ALLOWED[act.action].join(', ')}`)
  const db = useDb()
  const audit = (tx: Tx, detail: Record<string, unknown> = {}) => recordAudit(tx, { action: `invoice.${act.action}`, companyId: actor.companyId, actorUserId: actor.id, subjectType: 'invoice', subjectId: id, ip, detail })
  switch (act.action) {
    case 'finalize': {
      await db.transaction(async (tx) => {
        const r = await finalizeInTx(tx, id)
        await audit(tx, r)
      })
      await syncInvoiceToProvider(id).catch(() => {})
      break
    }
    case 'send':
      await db.transaction(async (tx) => {
        const queued = await sendInTx(tx, id, `invoice:${id}:sent:${Date.now()}`)
        if (!queued) throw httpError(409, 'No contact of this customer gets invoices by e-mail; add an e-mail address or tick "Invoices" on a contact')
        await audit(tx)
      })
      break
    case 'void':
    case 'mark_uncollectible': {
      if (inv.status === 'open' && inv.providerInvoiceId) await mirrorOnProvider(inv, act.action)
      const now = new Date()
      await db.transaction(async (tx) => {
        await tx.update(invoices).set(act.action === 'void' ? { status: 'void', voidedAt: now } : { status: 'uncollectible', uncollectibleAt: now })
          .where(and(eq(invoices.id, id), inArray(invoices.status, ALLOWED[act.action])))
        await audit(tx, { reason: act.reason })
      })
      break
    }
    case 'record_payment': {
      if (inv.providerInvoiceId) await mirrorOnProvider(inv, 'pay_out_of_band')
      await db.transaction(async (tx) => {
        const [paid] = await tx.update(invoices).set({
          status: 'paid', paidAt: new Date(`${act.paidOn}T12:00:00Z`), amountPaidMinor: inv.totalMinor,
          paymentMethod: act.method, paymentReference: act.reference,
        }).where(and(eq(invoices.id, id), eq(invoices.status, 'open'))).returning({ id: invoices.id })
        if (!paid) throw httpError(409, 'This invoice was paid or changed meanwhile; reload it')
        await queueInvoiceMail(tx, id, 'receipt', `invoice:${id}:receipt`)
        await audit(tx, { method: act.method, reference: act.reference, paidOn: act.paidOn })
      })
      break
    }
  }
  return getInvoice(actor, id)
}
