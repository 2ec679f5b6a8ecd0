import { and, eq, inArray } from 'drizzle-orm'
import type { InvoiceAction } from '../../shared/schemas/billing'
import { INVOICE_ACTION_LABELS, INVOICE_AUDIT_ACTIONS, INVOICE_STATUS_LABELS } from '../../shared/types/billing'
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
  issue: ['preparing'],
  send: ['due'],
  cancel: ['preparing', 'due'],
  write_off: ['due'],
  record_payment: ['due'],
}

const said = (states: InvoiceRow['status'][]) => states.map(s => INVOICE_STATUS_LABELS[s].toLowerCase()).join(' or ')

/**
 * The owner's invoice actions. Provider calls (cancel, write off, paid out of band) happen
 * before the database changes, so a provider outage leaves the invoice as it was (503) instead
 * of the two disagreeing; `issue` writes first and syncs after (a failed sync is retried).
 */
export async function actOnInvoice(actor: SessionUser, id: string, act: InvoiceAction, ip: string) {
  const inv = await loadInvoice(actor, id)
  if (!ALLOWED[act.action].includes(inv.status)) throw httpError(409, `An invoice that is ${INVOICE_STATUS_LABELS[inv.status].toLowerCase()} cannot be given "${INVOICE_ACTION_LABELS[act.action].toLowerCase()}"; only one that is ${said(ALLOWED[act.action])}`)
  const db = useDb()
  const audit = (tx: Tx, detail: Record<string, unknown> = {}) => recordAudit(tx, { action: INVOICE_AUDIT_ACTIONS[act.action], companyId: actor.companyId, actorUserId: actor.id, subjectType: 'invoice', subjectId: id, ip, detail })
  switch (act.action) {
    case 'issue': {
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
    case 'cancel':
    case 'write_off': {
      const to = act.action === 'cancel' ? 'cancelled' : 'written_off'
      if (inv.status === 'due' && inv.providerInvoiceId) await mirrorOnProvider(inv, to)
      const now = new Date()
      await db.transaction(async (tx) => {
        await tx.update(invoices).set(to === 'cancelled' ? { status: to, cancelledAt: now } : { status: to, writtenOffAt: now })
          .where(and(eq(invoices.id, id), inArray(invoices.status, ALLOWED[act.action])))
        await audit(tx, { reason: act.reason })
      })
      break
    }
    case 'record_payment': {
      if (inv.providerInvoiceId) await mirrorOnProvider(inv, 'paid')
      await db.transaction(async (tx) => {
        const [paid] = await tx.update(invoices).set({
          status: 'paid', paidAt: new Date(`${act.paidOn}T12:00:00Z`), amountPaidMinor: inv.totalMinor,
          paymentMethod: act.method, paymentReference: act.reference,
        }).where(and(eq(invoices.id, id), eq(invoices.status, 'due'))).returning({ id: invoices.id })
        if (!paid) throw httpError(409, 'This invoice was paid or changed meanwhile; reload it')
        await queueInvoiceMail(tx, id, 'receipt', `invoice:${id}:receipt`)
        await audit(tx, { method: act.method, reference: act.reference, paidOn: act.paidOn })
      })
      break
    }
  }
  return getInvoice(actor, id)
}
