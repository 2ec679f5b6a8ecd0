import { and, eq, inArray, isNull } from 'drizzle-orm'
import Stripe from 'stripe'
import { afterAll, describe, expect, inject, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { api, tokenFor } from '../helpers/api'
import { providerStatus } from '../../server/utils/payment-states'
import { BOOK_TODAY, buildBook, closeTestDb, runBillingTask, testDb, type Book } from '../helpers/billing-book'

// The billing job on a hand-built book (tests/helpers/billing-book.ts), run as of 2027-03-10:
//   K1 yearly $1,200, term to 2027-03-31, renews by itself → renewed; the new term's invoice
//      $1,200 + 8 % = $1,296.00 is raised (30 days ahead).
//   K2 yearly, asks first → left alone.  K5 term ended 2027-03-05 → ended.
//   K3 monthly $100 from 2026-12-15, first month billed → Jan 15 and Feb 15 raised, $108.00 each.
//   K4 per visit $250, two finished visits → two invoices of $270.00.
//   Due invoices 7, 14, 37 and 5 days overdue → reminders 1, 2, 3 (one e-mail) and none.
// Five invoices in all, numbered 2027-0009 … 2027-0013 after the eight already there.
const EXPECTED_TOTALS = [10_800, 10_800, 27_000, 27_000, 129_600].sort((a, b) => a - b)

afterAll(closeTestDb)

const stripe = () => new Stripe(inject('paymentsEnv').STRIPE_SECRET_KEY!, { host: '127.0.0.1', port: Number(new URL(inject('paymentsUrl')).port), protocol: 'http', maxNetworkRetries: 0, telemetry: false })
const fake = (path: string, body?: unknown) => fetch(`${inject('paymentsUrl')}${path}`, { method: body === undefined ? 'GET' : 'POST', headers: { 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) })

async function raised(book: Book) {
  return testDb().select().from(schema.invoices).where(and(eq(schema.invoices.companyId, book.companyId), inArray(schema.invoices.source, ['contract_term', 'contract_month', 'visit']), eq(schema.invoices.issueDate, BOOK_TODAY)))
}

/** Everything the job should have left behind, once; used after every kind of run. */
async function expectFinalState(book: Book) {
  const db = testDb()
  const rows = await raised(book)
  expect(rows.map(r => r.totalMinor).sort((a, b) => a - b)).toEqual(EXPECTED_TOTALS)
  expect(rows.map(r => r.number).sort()).toEqual(['2027-0009', '2027-0010', '2027-0011', '2027-0012', '2027-0013'])
  expect(rows.every(r => r.status === 'due' && r.dueDate === '2027-03-24' && r.sentAt)).toBe(true)
  expect(rows.map(r => r.billingKey).sort()).toEqual([
    `month:${book.contracts.k3}:2027-01-15`, `month:${book.contracts.k3}:2027-02-15`,
    ...rows.filter(r => r.source === 'contract_term').map(r => r.billingKey), ...rows.filter(r => r.source === 'visit').map(r => r.billingKey),
  ].sort())
  const [counter] = await db.select().from(schema.invoiceCounters).where(and(eq(schema.invoiceCounters.companyId, book.companyId), eq(schema.invoiceCounters.year, 2027)))
  expect(counter!.lastSeq).toBe(13)
  // One renewal of K1, starting the day after its term; K5 ended; K2 untouched.
  const all = await db.select().from(schema.contracts).where(eq(schema.contracts.companyId, book.companyId))
  const next = all.filter(c => c.previousContractId === book.contracts.k1)
  expect(next).toHaveLength(1)
  expect(next[0]).toMatchObject({ status: 'active', termStart: '2027-04-01', termEnd: '2028-03-31' })
  expect(all.filter(c => c.previousContractId)).toHaveLength(1)
  expect(all.find(c => c.id === book.contracts.k5)!.status).toBe('ended')
  expect(all.find(c => c.id === book.contracts.k2)!.status).toBe('active')
  const term = rows.find(r => r.source === 'contract_term')!
  expect(term.contractId).toBe(next[0]!.id)
  expect(term).toMatchObject({ periodStart: '2027-04-01', periodEnd: '2028-03-31', subtotalMinor: 120_000, taxMinor: 9_600 })
  // Its visits exist.
  const visits = await db.select({ id: schema.visits.id }).from(schema.visits).where(eq(schema.visits.contractId, next[0]!.id))
  expect(visits.length).toBeGreaterThan(0)
  // Each invoice e-mailed once; each reminder stage once.
  const ids = rows.map(r => r.id)
  const mail = await db.select({ key: schema.outbox.dedupeKey, to: schema.outbox.to }).from(schema.outbox).where(eq(schema.outbox.companyId, book.companyId))
  for (const id of ids) expect(mail.filter(m => m.key.startsWith(`invoice:${id}:sent`))).toHaveLength(1)
  expect(mail.filter(m => m.key.includes(':reminder:')).map(m => m.key).sort()).toEqual([
    `invoice:${book.overdue.i1}:reminder:1`, `invoice:${book.overdue.i2}:reminder:2`, `invoice:${book.overdue.i3}:reminder:3`,
  ].sort())
  expect(mail.every(m => m.to.includes(book.customerEmail))).toBe(true)
  const stages = await db.select({ id: schema.invoices.id, stage: schema.invoices.reminderStage }).from(schema.invoices).where(inArray(schema.invoices.id, Object.values(book.overdue)))
  expect(Object.fromEntries(stages.map(s => [s.id, s.stage]))).toEqual({ [book.overdue.i1]: 1, [book.overdue.i2]: 2, [book.overdue.i3]: 3, [book.overdue.i4]: 0 })
  // The provider holds exactly one issued copy of each, for the right amount.
  const synced = await db.select().from(schema.invoices).where(inArray(schema.invoices.id, ids))
  expect(synced.every(r => r.providerInvoiceId && r.providerSyncedAt && !r.providerError)).toBe(true)
  const [customer] = await db.select().from(schema.customers).where(eq(schema.customers.id, rows[0]!.customerId))
  const remote = await stripe().invoices.list({ customer: customer!.paymentCustomerId!, limit: 100 })
  expect(remote.data.map(r => r.amount_due).sort((a, b) => a - b)).toEqual(EXPECTED_TOTALS)
  expect(remote.data.every(r => r.status === providerStatus('due'))).toBe(true)
}

describe('the billing job (billing:renew)', () => {
  it('creates exactly the expected invoices, renewals and reminders, once, when two runs race and a third follows', async () => {
    const book = await buildBook('double')
    const [a, b] = await Promise.all([runBillingTask({ companyId: book.companyId }), runBillingTask({ companyId: book.companyId })])
    const ran = [a.result, b.result].filter(r => !r.skipped)
    expect(ran.length).toBeGreaterThanOrEqual(1)
    expect(ran.reduce((s, r) => s + r.invoicesRaised, 0)).toBe(5)
    expect(ran.reduce((s, r) => s + r.renewed, 0)).toBe(1)
    expect(ran.reduce((s, r) => s + r.reminders, 0)).toBe(3)
    expect(ran.reduce((s, r) => s + r.ended, 0)).toBe(1)
    await expectFinalState(book)
    const third = await runBillingTask({ companyId: book.companyId })
    expect(third.result).toMatchObject({ skipped: false, renewed: 0, ended: 0, invoicesRaised: 0, providerSynced: 0, reminders: 0, errors: [] })
    await expectFinalState(book)

    // The owner sees the runs, and the revenue view on the same book (hand-computed as of 2027-03-10):
    // in force K1 $100 + K2 $50 + K3 $100 + K4 $250 × 3 planned visits / 12 = $62.50 → $312.50.
    const owner = await tokenFor(book.ownerEmail)
    const runs = await api('/api/billing/runs', { token: owner })
    expect(runs.body.rows[0].status).toBe('done')
    const r = (await api(`/api/revenue?asOf=${BOOK_TODAY}`, { token: owner })).body
    expect(r.mrrMinor).toBe(31_250)
    expect(r.arrMinor).toBe(375_000)
    expect(r.activeContracts).toBe(4)
    // K5 ended on 2027-03-05 without a next term: churned in March ($900 / 12 = $75).
    expect(r.churnedThisMonth).toEqual({ count: 1, mrrMinor: 7_500 })
    expect(r.newThisMonth).toEqual({ count: 0, mrrMinor: 0 })
    // K2 ends 2027-04-04 (within 30 days, asks first); K4 ends 2027-05-31 (within 90, renews by itself).
    expect(r.renewalsDue).toEqual([
      { withinDays: 30, count: 1, autoRenew: 0, mrrMinor: 5_000 },
      { withinDays: 60, count: 1, autoRenew: 0, mrrMinor: 5_000 },
      { withinDays: 90, count: 2, autoRenew: 1, mrrMinor: 11_250 },
    ])
    // Not yet due: the five new ones ($1,296 + 2 × $108 + 2 × $270); 1–30 days: I1, I2, I4; 31–60: I3.
    expect(r.receivables).toEqual([
      { bucket: 'current', count: 5, amountMinor: 205_200 },
      { bucket: '1-30', count: 3, amountMinor: 32_400 },
      { bucket: '31-60', count: 1, amountMinor: 10_800 },
      { bucket: '61-90', count: 0, amountMinor: 0 },
      { bucket: '90+', count: 0, amountMinor: 0 },
    ])
    expect(r.receivablesTotalMinor).toBe(248_400)
  })

  it('killed half-way and run again, it bills everything once and skips nothing', async () => {
    const book = await buildBook('crash')
    // Units: the renewal batch (1), ending terms (2), then each batch of invoices, here two to a
    // batch; die after the first batch (the first two invoices) is committed.
    const killed = await runBillingTask({ companyId: book.companyId, crashAfter: 3, invoiceBatch: 2 })
    expect(killed.signal).toBe('SIGKILL')
    expect((await raised(book)).length).toBe(2)
    const [stale] = await testDb().select().from(schema.taskRuns).where(and(eq(schema.taskRuns.companyId, book.companyId), eq(schema.taskRuns.status, 'running')))
    expect(stale).toBeTruthy()
    const again = await runBillingTask({ companyId: book.companyId })
    expect(again.result).toMatchObject({ renewed: 0, invoicesRaised: 3, reminders: 3, providerSynced: 5 })
    await expectFinalState(book)
    const [after] = await testDb().select().from(schema.taskRuns).where(eq(schema.taskRuns.id, stale!.id))
    expect(after!.status).toBe('crashed')
  })

  it('records a payment-provider outage and completes the work on the next run', async () => {
    const book = await buildBook('outage')
    await fake('/__fake/outage', { down: true })
    let down
    try {
      down = await runBillingTask({ companyId: book.companyId })
    }
    finally {
      await fake('/__fake/outage', { down: false })
    }
    // The invoices exist, are numbered and e-mailed (the e-mail links to the portal), but have no provider copy yet.
    expect(down.result).toMatchObject({ invoicesRaised: 5, providerSynced: 0, providerFailed: 5 })
    expect(down.result.errors.length).toBe(5)
    expect(down.result.errors[0].message).toMatch(/payment provider/i)
    const pending = await testDb().select().from(schema.invoices).where(and(eq(schema.invoices.companyId, book.companyId), eq(schema.invoices.status, 'due'), isNull(schema.invoices.providerSyncedAt)))
    expect(pending).toHaveLength(5)
    expect(pending.every(p => p.providerError)).toBe(true)
    const [run] = await testDb().select().from(schema.taskRuns).where(eq(schema.taskRuns.id, down.result.runId))
    expect(run!.status).toBe('done_with_errors')
    const next = await runBillingTask({ companyId: book.companyId })
    expect(next.result).toMatchObject({ invoicesRaised: 0, providerSynced: 5, providerFailed: 0, errors: [] })
    await expectFinalState(book)
  })
})
