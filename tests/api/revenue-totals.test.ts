// The revenue view and the invoices table read totals that PostgreSQL triggers keep
// (invoice_day_totals, contract_planned_visits). After each step of a sequence of invoice and
// contract changes, made through the API and straight in the database, the view and the table's
// count and sums must equal the same figures computed here directly from the base tables, to the
// minor unit. The contract figures are kept per process until a change counter moves
// (server/utils/versioned-cache.ts), so each step asks the test server and a second instance
// (another process on the same database), both of which have the previous step's answers kept.
import { and, eq, sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as schema from '../../server/db/schema'
import type { InvoiceStatus } from '../../shared/types/billing'
import { revenueFigures, type RevenueContract } from '../../shared/utils/revenue'
import { api, tokenFor } from '../helpers/api'
import { BOOK_TODAY, buildBook, closeTestDb, testDb, type Book } from '../helpers/billing-book'
import { startInstance, stopInstance, type Instance } from '../helpers/instances'

const OPEN: InvoiceStatus = 'due'
const PAID: InvoiceStatus = 'paid'

let book: Book
let owner: string
let customerId: string
let other: Instance
beforeAll(async () => {
  other = await startInstance('revenue-b', 1)
  book = await buildBook('totals')
  owner = await tokenFor(book.ownerEmail)
  const [c] = await testDb().select({ id: schema.customers.id }).from(schema.customers).where(eq(schema.customers.companyId, book.companyId))
  customerId = c!.id
})
afterAll(async () => {
  await stopInstance(other)
  await closeTestDb()
})

const rowsOf = async <T>(query: ReturnType<typeof sql>) => (await testDb().execute(query)).rows as T[]

/** The revenue view as of a date, computed straight from contracts, visits and invoices. */
async function directView(asOf: string) {
  const c = book.companyId
  const contracts = await rowsOf<RevenueContract & { autoRenew: boolean }>(sql`
    select ct.id, ct.customer_id as "customerId", ct.plan_id as "planId", p.name as "planName", p.billing_cadence as cadence,
      coalesce(ct.price_override_minor, p.price_minor)::int as "priceMinor", p.term_months as "termMonths",
      case when p.billing_cadence = 'per_visit' then (select count(*) from visits v where v.contract_id = ct.id and v.status <> 'cancelled') else 0 end::int as "plannedVisits",
      ct.status, to_char(ct.term_start, 'YYYY-MM-DD') as "termStart", to_char(ct.term_end, 'YYYY-MM-DD') as "termEnd",
      to_char(ct.ended_at at time zone co.time_zone, 'YYYY-MM-DD') as "endedOn", ct.previous_contract_id as "previousContractId", ct.auto_renew as "autoRenew"
    from contracts ct join plans p on p.id = ct.plan_id join companies co on co.id = ct.company_id
    where ct.company_id = ${c} and ct.status <> 'draft' and ct.currency = co.currency`)
  const figures = revenueFigures(contracts, asOf, new Map(contracts.map(r => [r.id, r.autoRenew])))
  const receivables = await rowsOf<{ bucket: string, count: number, amountMinor: number }>(sql`
    with b(bucket, lo, hi, pos) as (values ('current', -100000, 0, 1), ('1-30', 1, 30, 2), ('31-60', 31, 60, 3), ('61-90', 61, 90, 4), ('90+', 91, 100000, 5))
    select b.bucket, count(i.id)::int as count, coalesce(sum(i.total_minor - i.amount_paid_minor), 0)::int as "amountMinor"
    from b left join invoices i on i.company_id = ${c} and i.status = ${OPEN} and i.currency = 'USD'
      and (${asOf}::date - coalesce(i.due_date, ${asOf}::date)) between b.lo and b.hi
    group by b.bucket, b.pos order by b.pos`)
  const invoiced = await rowsOf<{ planId: string, planName: string, invoicedMinor: number, paidMinor: number }>(sql`
    select p.id as "planId", p.name as "planName", sum(i.subtotal_minor)::int as "invoicedMinor", sum(case when i.status = ${PAID} then i.subtotal_minor else 0 end)::int as "paidMinor"
    from invoices i join contracts ct on ct.id = i.contract_id join plans p on p.id = ct.plan_id
    where i.company_id = ${c} and i.status in (${OPEN}, ${PAID}) and i.currency = 'USD'
      and i.issue_date > (${asOf}::date - interval '12 months')::date and i.issue_date <= ${asOf}::date
    group by p.id, p.name`)
  const planIds = new Set([...figures.byPlan.map(p => p.planId), ...invoiced.map(p => p.planId)])
  const byPlan = [...planIds].map((planId) => {
    const live = figures.byPlan.find(p => p.planId === planId)
    const inv = invoiced.find(p => p.planId === planId)
    return { planId, planName: live?.planName ?? inv!.planName, contracts: live?.contracts ?? 0, mrrMinor: live?.mrrMinor ?? 0, invoicedMinor: inv?.invoicedMinor ?? 0, paidMinor: inv?.paidMinor ?? 0 }
  }).sort((a, b) => b.mrrMinor - a.mrrMinor || b.invoicedMinor - a.invoicedMinor)
  return { currency: 'USD', ...figures, byPlan, receivables, receivablesTotalMinor: receivables.reduce((s, b) => s + b.amountMinor, 0) }
}

/** The invoices table's count and sums for a filter, straight from the invoices. */
async function directListTotals(filter: { status?: InvoiceStatus | 'overdue', from?: string, to?: string }, today: string) {
  const where = [sql`company_id = ${book.companyId}`]
  if (filter.status === 'overdue') where.push(sql`status = ${OPEN} and due_date < ${today}::date`)
  else if (filter.status) where.push(sql`status = ${filter.status}`)
  if (filter.from) where.push(sql`issue_date >= ${filter.from}::date`)
  if (filter.to) where.push(sql`issue_date <= ${filter.to}::date`)
  const sums = await rowsOf<{ currency: string, n: number, totalMinor: number, dueMinor: number }>(sql`
    select currency, count(*)::int as n, sum(total_minor)::int as "totalMinor", sum(case when status = ${OPEN} then total_minor - amount_paid_minor else 0 end)::int as "dueMinor"
    from invoices where ${sql.join(where, sql` and `)} group by currency order by currency`)
  return { total: sums.reduce((s, r) => s + r.n, 0), sums: sums.map(({ currency, totalMinor, dueMinor }) => ({ currency, totalMinor, dueMinor })) }
}

async function expectExact(step: string) {
  for (const base of [undefined, other.baseUrl]) {
    const where = base ? 'the second instance' : 'the test server'
    for (const asOf of [BOOK_TODAY, '2027-01-31', '2027-06-30']) {
      const view = await api(`/api/revenue?asOf=${asOf}`, { token: owner, base })
      expect(view.status, step).toBe(200)
      expect(view.body, `${step}: the revenue view as of ${asOf} on ${where}`).toEqual(await directView(asOf))
    }
    // As of the company's today (whatever day the test runs on).
    const today = await api('/api/revenue', { token: owner, base })
    expect(today.status, step).toBe(200)
    expect(today.body, `${step}: the revenue view as of today on ${where}`).toEqual(await directView(today.body.asOf))
  }
  const filters = [{}, { status: OPEN }, { status: PAID }, { status: 'overdue' as const }, { from: '2027-02-01', to: '2027-03-31' }]
  for (const f of filters) {
    const list = await api(`/api/invoices?${new URLSearchParams({ pageSize: '5', ...f })}`, { token: owner })
    expect(list.status, step).toBe(200)
    expect({ total: list.body.total, sums: list.body.sums }, `${step}: the invoices table filtered by ${JSON.stringify(f)}`).toEqual(await directListTotals(f, list.body.today))
  }
}

const invoiceAct = async (id: string, body: Record<string, unknown>) => {
  const r = await api(`/api/invoices/${id}/actions`, { method: 'POST', token: owner, body })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
  return r.body
}
const contractAct = async (id: string, body: Record<string, unknown>) => {
  const r = await api(`/api/contracts/${id}/actions`, { method: 'POST', token: owner, body })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
  return r.body
}
const issued = async (contractId: string | null, unitPriceMinor: number) => {
  const d = await api('/api/invoices', { method: 'POST', token: owner, body: { customerId, lines: [{ kind: 'other', description: 'Pond clean-out', quantity: 1, unitPriceMinor, taxable: true }] } })
  expect(d.status, JSON.stringify(d.body)).toBe(201)
  // The plan an invoice counts under is its contract's; hand-made invoices have none until linked here.
  if (contractId) await testDb().update(schema.invoices).set({ contractId }).where(eq(schema.invoices.id, d.body.id))
  return invoiceAct(d.body.id, { action: 'issue' })
}

describe('revenue totals kept by the database', () => {
  it('equal the figures computed from the base tables after every kind of change', async () => {
    await expectExact('the book as built')
    const { k1, k2, k3, k4, k5 } = book.contracts

    const a = await issued(k3, 12_345)
    const b = await issued(k4, 2_001)
    const c = await issued(null, 999)
    await expectExact('three invoices issued')

    await invoiceAct(a.id, { action: 'record_payment', method: 'cheque', reference: 'Cheque 1', paidOn: a.issueDate })
    await expectExact('one paid offline')

    // A partial online payment is recorded by the webhook as an amount paid on a due invoice.
    await testDb().update(schema.invoices).set({ amountPaidMinor: 1_000 }).where(eq(schema.invoices.id, b.id))
    await expectExact('one partly paid')

    await invoiceAct(c.id, { action: 'cancel', reason: 'Raised twice' })
    await invoiceAct(book.overdue.i3, { action: 'write_off', reason: 'Moved away' })
    await expectExact('one cancelled, one written off')

    await contractAct(k2, { action: 'renew', reason: '' })
    await contractAct(k3, { action: 'pause', reason: 'Winter' })
    await contractAct(k1, { action: 'end', reason: 'Sold the house' })
    await expectExact('a contract renewed, one paused, one ended')

    // A per-visit contract's value follows its visits: cancel one, add one.
    const [visit] = await testDb().select().from(schema.visits).where(and(eq(schema.visits.contractId, k4), eq(schema.visits.status, 'scheduled'))).limit(1)
    await testDb().update(schema.visits).set({ status: 'cancelled' }).where(eq(schema.visits.id, visit!.id))
    await expectExact('a planned visit cancelled')
    const { id: _id, ...again } = visit!
    await testDb().insert(schema.visits).values({ ...again, scheduledOn: '2027-05-20', startsAt: new Date('2027-05-20T14:00:00Z'), generationKey: null })
    await expectExact('a visit added')

    // An invoice moved in time and to another contract (and so another plan), then deleted.
    await testDb().update(schema.invoices).set({ issueDate: '2026-12-30', dueDate: '2027-01-13', contractId: k5 }).where(eq(schema.invoices.id, b.id))
    await expectExact('an invoice moved')
    await testDb().delete(schema.invoiceLines).where(eq(schema.invoiceLines.invoiceId, b.id))
    await testDb().delete(schema.invoices).where(eq(schema.invoices.id, b.id))
    await expectExact('an invoice deleted')

    // A plan's price, a contract's term and price written straight in the database, a new contract.
    const [perVisit] = await testDb().select({ planId: schema.contracts.planId }).from(schema.contracts).where(eq(schema.contracts.id, k4))
    const plan = await api(`/api/plans/${perVisit!.planId}`, { method: 'PATCH', token: owner, body: { priceMinor: 31_000 } })
    expect(plan.status, JSON.stringify(plan.body)).toBe(200)
    await expectExact('a plan\'s price changed')
    await testDb().update(schema.contracts).set({ termEnd: '2027-08-31', priceOverrideMinor: 27_500 }).where(eq(schema.contracts.id, k4))
    await expectExact('a contract\'s term and price changed')
    const [k6] = await testDb().insert(schema.contracts).values({ companyId: book.companyId, customerId, planId: perVisit!.planId, status: 'active', termStart: '2027-01-20', termEnd: '2028-01-19', autoRenew: true, currency: 'USD', activatedAt: new Date('2027-01-20T15:00:00Z') }).returning()
    await expectExact('a contract added')
    await testDb().update(schema.contracts).set({ status: 'ended', endedAt: new Date('2027-02-14T23:30:00Z') }).where(eq(schema.contracts.id, k6!.id))
    await expectExact('a contract ended early')

    // The company's settings: its time zone moves the day an ending counts on; its units change nothing.
    const zone = await api('/api/company', { method: 'PATCH', token: owner, body: { timeZone: 'Pacific/Auckland' } })
    expect(zone.status, JSON.stringify(zone.body)).toBe(200)
    await expectExact('the company\'s time zone changed')
    const units = await api('/api/company', { method: 'PATCH', token: owner, body: { unitSystem: 'metric' } })
    expect(units.status, JSON.stringify(units.body)).toBe(200)
    await expectExact('the company\'s units changed')
  })
})
