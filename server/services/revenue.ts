import { and, eq, inArray, isNotNull, ne, sql } from 'drizzle-orm'
import { RECEIVABLE_BUCKETS, receivableBucket, daysBetween } from '../../shared/utils/billing'
import { localToday } from '../../shared/utils/company-time'
import { revenueFigures, type RevenueContract, type RevenueFigures } from '../../shared/utils/revenue'
import type { InvoiceStatus } from '../../shared/types/billing'
import { companies, contractPlannedVisits, contracts, invoiceDayTotals, plans } from '../db/schema'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { counterOf, versionedCache } from '../utils/versioned-cache'

/** The invoices still asking for money (receivables). */
const RECEIVABLE: InvoiceStatus = 'due'
/** The invoices that count as invoiced revenue (issued and not cancelled or written off), and the paid ones among them. */
const INVOICED: InvoiceStatus[] = ['due', 'paid']
const PAID: InvoiceStatus = 'paid'

/**
 * The contract figures kept per process under the company's 'revenue' change counter, and the
 * whole view under that and its 'invoices' counter (a few kB each: 64 companies and dates).
 */
const figuresCache = versionedCache<RevenueFigures>(64)
const viewCache = versionedCache<RevenueView>(64)
export type RevenueView = Awaited<ReturnType<typeof buildView>>

/**
 * The owner's recurring-revenue view as of a company-local date (today by default): the
 * contract figures from shared/utils/revenue, receivables by age and invoiced revenue by plan.
 * Only the company's own currency is counted. Invoice figures come from `invoice_day_totals`
 * and planned visits from `contract_planned_visits`, both kept exact by triggers. The contract
 * figures are computed over every contract once per date and kept until the company's
 * contracts, plans, settings or counted visits change; the whole view is kept until those or its
 * invoices change (versioned-cache), so a request reads one row: the company with its counters.
 */
export async function revenueView(companyId: string, asOfDate?: string): Promise<RevenueView> {
  const [company] = await useDb().select({ currency: companies.currency, timeZone: companies.timeZone, revenue: counterOf('revenue', 'companies', 'id'), invoices: counterOf('invoices', 'companies', 'id') })
    .from(companies).where(eq(companies.id, companyId)).limit(1)
  if (!company) throw httpError(404, 'No such company')
  const asOf = asOfDate ?? localToday(company.timeZone)
  const key = `${companyId}|${asOf}|${company.currency}|${company.timeZone}`
  return viewCache.get(key, `${company.revenue}.${company.invoices}`, () => buildView(companyId, company, asOf, key))
}

/** The revenue view from the kept (or new) contract figures and the invoice totals. */
async function buildView(companyId: string, company: { currency: string, timeZone: string, revenue: string }, asOf: string, key: string) {
  const db = useDb()
  const tz = company.timeZone
  // The kept (or new) contract figures and the two invoice aggregates at once, on the pool.
  const figuresOf = figuresCache.get(key, company.revenue, () => contractFigures(companyId, company.currency, tz, asOf))

  // Receivables: what due invoices still ask for, by days past their due date.
  const t = invoiceDayTotals
  const dueOf = db.select({ dueDate: t.dueDate, invoices: sql<number>`sum(${t.invoices})::int`, due: sql<number>`sum(${t.totalMinor} - ${t.amountPaidMinor})::bigint` })
    .from(t).where(and(eq(t.companyId, companyId), eq(t.status, RECEIVABLE), eq(t.currency, company.currency))).groupBy(t.dueDate)

  // Invoiced (before tax; not cancelled or written off) over the last 12 months, by the contract's plan.
  const since = sql`(${asOf}::date - interval '12 months')::date`
  const invoicedOf = db.select({ planId: plans.id, planName: plans.name, subtotalMinor: sql<number>`sum(${t.subtotalMinor})::bigint`, paidMinor: sql<number>`sum(case when ${t.status} = ${PAID} then ${t.subtotalMinor} else 0 end)::bigint` })
    .from(t).innerJoin(plans, eq(plans.id, t.planId))
    .where(and(eq(t.companyId, companyId), inArray(t.status, INVOICED), eq(t.currency, company.currency), isNotNull(t.planId), sql`${t.issueDate} > ${since}`, sql`${t.issueDate} <= ${asOf}`))
    .groupBy(plans.id, plans.name)
  const [figures, due, invoiced] = await Promise.all([figuresOf, dueOf, invoicedOf])

  const buckets = new Map(RECEIVABLE_BUCKETS.map(b => [b, { bucket: b, count: 0, amountMinor: 0 }]))
  for (const r of due) {
    const b = buckets.get(receivableBucket(r.dueDate ? daysBetween(r.dueDate, asOf) : 0))!
    b.count += Number(r.invoices)
    b.amountMinor += Number(r.due)
  }

  const invoicedByPlan = new Map(invoiced.map(r => [r.planId, r]))
  const planIds = new Set([...figures.byPlan.map(p => p.planId), ...invoicedByPlan.keys()])
  const byPlan = [...planIds].map((planId) => {
    const live = figures.byPlan.find(p => p.planId === planId)
    const inv = invoicedByPlan.get(planId)
    return { planId, planName: live?.planName ?? inv!.planName, contracts: live?.contracts ?? 0, mrrMinor: live?.mrrMinor ?? 0, invoicedMinor: Number(inv?.subtotalMinor ?? 0), paidMinor: Number(inv?.paidMinor ?? 0) }
  }).sort((a, b) => b.mrrMinor - a.mrrMinor || b.invoicedMinor - a.invoicedMinor)

  return { currency: company.currency, ...figures, byPlan, receivables: [...buckets.values()], receivablesTotalMinor: [...buckets.values()].reduce((s, b) => s + b.amountMinor, 0) }
}

/** The contract figures of the revenue view, from every contract of the company in its currency. */
async function contractFigures(companyId: string, currency: string, tz: string, asOf: string): Promise<RevenueFigures> {
  const rows = await useDb().select({
    id: contracts.id, customerId: contracts.customerId, planId: contracts.planId, planName: plans.name, cadence: plans.billingCadence,
    priceMinor: sql<number>`coalesce(${contracts.priceOverrideMinor}, ${plans.priceMinor})`, termMonths: plans.termMonths,
    plannedVisits: sql<number>`case when ${plans.billingCadence} = 'per_visit' then coalesce(${contractPlannedVisits.visits}, 0) else 0 end`,
    status: contracts.status, termStart: contracts.termStart, termEnd: contracts.termEnd,
    endedOn: sql<string | null>`to_char(${contracts.endedAt} at time zone ${tz}, 'YYYY-MM-DD')`,
    previousContractId: contracts.previousContractId, autoRenew: contracts.autoRenew,
  }).from(contracts).innerJoin(plans, eq(plans.id, contracts.planId)).leftJoin(contractPlannedVisits, eq(contractPlannedVisits.contractId, contracts.id))
    .where(and(eq(contracts.companyId, companyId), ne(contracts.status, 'draft'), eq(contracts.currency, currency)))
  const list: RevenueContract[] = rows.map(r => ({ ...r, priceMinor: Number(r.priceMinor), plannedVisits: Number(r.plannedVisits) }))
  return revenueFigures(list, asOf, new Map(rows.map(r => [r.id, r.autoRenew])))
}
