// Demo invoice history for the seed's own contracts: what the billing job would have raised up to
// today (same billing keys, so the job never raises them again), mostly paid, some due, a few
// overdue at different reminder stages. Numbers run in issue-date order, gapless per year.
import { and, asc, eq, inArray, lte } from 'drizzle-orm'
import { monthlyPeriods } from '../../shared/utils/billing'
import { addDays, localToday } from '../../shared/utils/company-time'
import { companies, contracts, invoices, plans, visits } from '../../server/db/schema'
import { monthInvoice, termInvoice, visitInvoice } from '../../server/services/billing-run'
import { finalizeInTx, insertDraft, type NewInvoice } from '../../server/services/invoices'
import type { Tx } from '../../server/utils/db'

const METHODS = ['card', 'cheque', 'bank_transfer', 'card', 'card'] as const

export async function seedInvoices(tx: Tx, companyId: string, contractIds: string[]) {
  if (!contractIds.length) return 0
  const [company] = await tx.select().from(companies).where(eq(companies.id, companyId)).limit(1)
  const today = localToday(company!.timeZone)
  await tx.update(companies).set({ address: '41 Alderbank Road\nLarchfield, LF 54100', billingEmail: 'accounts@heronmere.example', paymentTermsDays: 30 }).where(eq(companies.id, companyId))
  const rows = await tx.select({
    id: contracts.id, customerId: contracts.customerId, currency: contracts.currency, termStart: contracts.termStart, termEnd: contracts.termEnd, status: contracts.status,
    cadence: plans.billingCadence, planName: plans.name, priceMinor: plans.priceMinor, override: contracts.priceOverrideMinor,
  }).from(contracts).innerJoin(plans, eq(plans.id, contracts.planId)).where(inArray(contracts.id, contractIds)).orderBy(asc(contracts.id))
  const specs: Array<{ issue: string, n: NewInvoice }> = []
  for (const c of rows) {
    const billed = { id: c.id, companyId, customerId: c.customerId, currency: c.currency, planName: c.planName, priceMinor: c.override ?? c.priceMinor }
    if (c.cadence === 'yearly') {
      const issue = addDays(c.termStart, -14)
      if (issue <= today) specs.push({ issue, n: termInvoice(billed, { start: c.termStart, end: c.termEnd }) })
    }
    else if (c.cadence === 'monthly') {
      for (const p of monthlyPeriods(c.termStart, c.termEnd)) {
        if (p.start > today || (c.status === 'paused' && p.start > addDays(today, -40))) break
        specs.push({ issue: p.start, n: monthInvoice(billed, p) })
      }
    }
    else {
      const done = await tx.select({ id: visits.id, scheduledOn: visits.scheduledOn, visitType: visits.visitType }).from(visits)
        .where(and(eq(visits.contractId, c.id), eq(visits.status, 'done'), lte(visits.scheduledOn, today))).orderBy(asc(visits.scheduledOn))
      for (const v of done) specs.push({ issue: v.scheduledOn, n: visitInvoice(billed, v) })
    }
  }
  specs.sort((a, b) => a.issue.localeCompare(b.issue) || a.n.billingKey!.localeCompare(b.n.billingKey!))
  let added = 0
  for (const [i, s] of specs.entries()) {
    const id = await insertDraft(tx, s.n)
    if (!id) continue
    added++
    const { issueDate } = await finalizeInTx(tx, id, s.issue)
    const [inv] = await tx.select({ dueDate: invoices.dueDate, total: invoices.totalMinor }).from(invoices).where(eq(invoices.id, id)).limit(1)
    const overdueDays = Math.round((Date.parse(today) - Date.parse(inv!.dueDate!)) / 86_400_000)
    const sentAt = new Date(`${issueDate}T14:00:00Z`)
    // Recent ones are still due; every 9th older one (up to 100 days) is overdue, its reminders already sent.
    const stillDue = overdueDays < 0 || (i % 9 === 4 && overdueDays < 100)
    if (stillDue) {
      const stage = overdueDays >= 30 ? 3 : overdueDays >= 14 ? 2 : overdueDays >= 7 ? 1 : 0
      await tx.update(invoices).set({ sentAt, reminderStage: stage }).where(eq(invoices.id, id))
      continue
    }
    const paidOn = addDays(issueDate, 3 + (i % 20))
    const method = METHODS[i % METHODS.length]!
    await tx.update(invoices).set({
      sentAt, status: 'paid', paidAt: new Date(`${paidOn < today ? paidOn : today}T16:00:00Z`), amountPaidMinor: inv!.total,
      paymentMethod: method, paymentReference: method === 'cheque' ? `Cheque ${1040 + i}` : method === 'bank_transfer' ? `Transfer ${i}` : '',
    }).where(eq(invoices.id, id))
  }
  return added
}
