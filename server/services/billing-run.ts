import { and, asc, eq, inArray, isNull, lt, lte, notExists, or, sql } from 'drizzle-orm'
import { VISIT_TYPE_LABELS } from '../../shared/types/schedule'
import { daysBetween, monthlyPeriods, reminderStageFor, RENEWAL_LEAD_DAYS, TERM_INVOICE_LEAD_DAYS, REMINDER_DAYS } from '../../shared/utils/billing'
import { addDays, formatLocalDate, localToday } from '../../shared/utils/company-time'
import { companies, contracts, invoices, plans, taskRuns, visits } from '../db/schema'
import { useDb, withSessionLock, type Tx } from '../utils/db'
import { paymentsConfigured } from '../utils/payments'
import { recordAudits } from './audit'
import { renewManyInTx } from './contracts'
import { syncInvoiceToProvider } from './invoice-payments'
import { queueInvoiceMails, raiseInvoicesInTx, type KeyedInvoice } from './invoices'

export const BILLING_TASK = 'billing:renew'
/** Contracts renewed per transaction (and per planner run). */
const RENEWAL_BATCH = 2000
/** Invoices raised per transaction, and overdue reminders sent per transaction. */
const INVOICE_BATCH = 500

export interface BillingRunOptions {
  /** Only this company (tests, the owner's "run now"); every company otherwise. */
  companyId?: string
  /** Company-local "today" for every company (tests); each company's own date otherwise. */
  today?: string
  now?: Date
  /** Invoices (and reminders) per transaction; INVOICE_BATCH unless given (the crash test makes it small). */
  invoiceBatch?: number
  /** Called after each unit of work is committed (the crash test kills the process here). */
  onUnit?: (done: number) => void
}

export interface BillingRunSummary {
  renewed: number
  ended: number
  invoicesRaised: number
  providerSynced: number
  providerFailed: number
  reminders: number
}

const fmtDate = (d: string) => formatLocalDate(d, 'date')

/** A contract as it is billed: who, in what currency, for which plan at which price (per cadence period). */
export interface BilledContract { id: string, companyId: string, customerId: string, currency: string, planName: string, priceMinor: number }

const planLine = (c: BilledContract, start: string, end: string) => [{ kind: 'plan' as const, description: `${c.planName}, ${fmtDate(start)} – ${fmtDate(end)}`, quantity: 1, unitPriceMinor: c.priceMinor, taxable: true }]
const billedBy = (c: BilledContract) => ({ companyId: c.companyId, customerId: c.customerId, contractId: c.id, currency: c.currency })

/** The invoice of a yearly term (billed in advance); its key makes it once per term. */
export function termInvoice(c: BilledContract, term: { start: string, end: string }): KeyedInvoice {
  return { ...billedBy(c), source: 'contract_term', billingKey: `term:${c.id}`, periodStart: term.start, periodEnd: term.end, lines: planLine(c, term.start, term.end) }
}

/** The invoice of one month of a monthly contract. */
export function monthInvoice(c: BilledContract, p: { start: string, end: string }): KeyedInvoice {
  return { ...billedBy(c), source: 'contract_month', billingKey: `month:${c.id}:${p.start}`, periodStart: p.start, periodEnd: p.end, lines: planLine(c, p.start, p.end) }
}

/** The invoice of one finished visit of a per-visit contract. */
export function visitInvoice(c: BilledContract, v: { id: string, scheduledOn: string, visitType: keyof typeof VISIT_TYPE_LABELS }): KeyedInvoice {
  return {
    ...billedBy(c), visitId: v.id, source: 'visit', billingKey: `visit:${v.id}`, periodStart: v.scheduledOn, periodEnd: v.scheduledOn,
    lines: [{ kind: 'visit', description: `${VISIT_TYPE_LABELS[v.visitType]} on ${fmtDate(v.scheduledOn)} (${c.planName})`, quantity: 1, unitPriceMinor: c.priceMinor, taxable: true }],
  }
}

/**
 * The daily billing job: renews auto-renewing terms, ends finished ones, raises the invoices that
 * are due (yearly terms in advance, each month of a monthly contract, each finished per-visit
 * visit), issues and e-mails them, brings the payment provider's copies up to date and sends the
 * overdue reminders (7, 14 and 30 days).
 *
 * Safe to repeat and to kill at any point: every unit of work is its own transaction, and what it
 * creates is keyed — a term is renewed once (unique previous_contract_id), an invoice exists once
 * per contract and period (unique billing_key), a reminder once per stage (reminder_stage), a
 * provider object once per idempotency key. A second run finds nothing left to do; a run after a
 * crash or a provider outage finishes what the first did not. One run at a time across all app
 * instances (a PostgreSQL session advisory lock); every run is recorded in task_runs.
 */
export async function runBilling(opts: BillingRunOptions = {}) {
  const locked = await withSessionLock(BILLING_TASK, () => billingRun(opts))
  return locked.skipped ? { skipped: true as const } : { skipped: false as const, ...locked.value }
}

async function billingRun(opts: BillingRunOptions) {
  const db = useDb()
  const now = opts.now ?? new Date()
  // We hold the lock: a run still marked running was killed.
  await db.update(taskRuns).set({ status: 'crashed', finishedAt: now }).where(and(eq(taskRuns.name, BILLING_TASK), eq(taskRuns.status, 'running')))
  const [run] = await db.insert(taskRuns).values({ name: BILLING_TASK, status: 'running', startedAt: now, companyId: opts.companyId ?? null }).returning({ id: taskRuns.id })
  const summary: BillingRunSummary = { renewed: 0, ended: 0, invoicesRaised: 0, providerSynced: 0, providerFailed: 0, reminders: 0 }
  const errors: Array<{ companyId: string, subject: string, message: string }> = []
  let currentCompany = ''
  let units = 0
  const unit = async <T>(subject: string, fn: () => Promise<T>): Promise<T | undefined> => {
    let r: T
    try {
      r = await fn()
    }
    catch (err) {
      errors.push({ companyId: currentCompany, subject, message: err instanceof Error ? err.message : String(err) })
      return undefined
    }
    units++
    opts.onUnit?.(units)
    return r
  }
  /**
   * Work in batches, each one transaction (one unit). A batch that fails is done again one item at
   * a time, so one bad item is reported on its own and does not hold back the rest of its batch.
   */
  const batched = async <T, R>(items: readonly T[], size: number, subject: (batch: readonly T[]) => string, fn: (tx: Tx, batch: readonly T[]) => Promise<R[]>): Promise<R[]> => {
    const done: R[] = []
    for (let i = 0; i < items.length; i += size) {
      const batch = items.slice(i, i + size)
      const all = await unit(subject(batch), () => db.transaction(tx => fn(tx, batch)))
      if (all) done.push(...all)
      else if (batch.length > 1) {
        errors.pop()
        for (const item of batch) done.push(...(await unit(subject([item]), () => db.transaction(tx => fn(tx, [item]))) ?? []))
      }
    }
    return done
  }
  const invoiceBatch = Math.max(1, Math.trunc(opts.invoiceBatch ?? INVOICE_BATCH))
  // Seconds spent on each step, over every company (the bench reports them; process start is not in them).
  const seconds = { renewals: 0, terms: 0, invoices: 0, provider: 0, reminders: 0, total: 0 }
  const started = performance.now()
  let lap = started
  const timed = (step: Exclude<keyof typeof seconds, 'total'>) => {
    const t = performance.now()
    seconds[step] += (t - lap) / 1000
    lap = t
  }

  const companyRows = await db.select({ id: companies.id, timeZone: companies.timeZone }).from(companies)
    .where(opts.companyId ? eq(companies.id, opts.companyId) : undefined).orderBy(asc(companies.id))
  for (const company of companyRows) {
    currentCompany = company.id
    const today = opts.today ?? localToday(company.timeZone, now)
    const clock = { now: opts.today ? new Date(`${today}T12:00:00Z`) : now }

    // 1. Renew auto-renewing terms whose next term starts within the lead time.
    const renewable = await db.select({ id: contracts.id }).from(contracts)
      .where(and(eq(contracts.companyId, company.id), eq(contracts.status, 'active'), eq(contracts.autoRenew, true),
        lte(contracts.termEnd, addDays(today, RENEWAL_LEAD_DAYS - 1)),
        notExists(db.select({ x: sql`1` }).from(sql`contracts as next`).where(sql`next.previous_contract_id = ${contracts.id}`))))
      .orderBy(asc(contracts.termEnd), asc(contracts.id))
    // In batches: each batch is one transaction (all its renewals or none), planned together.
    const renewals = await batched(renewable.map(c => c.id), RENEWAL_BATCH, b => (b.length === 1 ? `contract ${b[0]}` : `contracts ${b[0]} … ${b.at(-1)} (${b.length})`),
      (tx, b) => renewManyInTx(tx, b, { clock }))
    summary.renewed += renewals.length
    timed('renewals')

    // 2. End terms that are over (renewed or not).
    await unit(`company ${company.id} terms`, async () => {
      const ended = await db.transaction(async (tx) => {
        // Ended at the start of the day after the term's last day, company time.
        const rows = await tx.update(contracts).set({ status: 'ended', endedAt: sql`((${contracts.termEnd} + 1)::timestamp at time zone ${company.timeZone})`, statusReason: 'Term ended' })
          .where(and(eq(contracts.companyId, company.id), inArray(contracts.status, ['active', 'paused']), lt(contracts.termEnd, today)))
          .returning({ id: contracts.id })
        await recordAudits(tx, rows.map(r => ({ action: 'contract.term_ended', companyId: company.id, subjectType: 'contract', subjectId: r.id })))
        return rows.length
      })
      summary.ended += ended
    })
    timed('terms')

    // 3. Raise what is due, in batches: one transaction makes, numbers, issues and e-mails a batch.
    const due: KeyedInvoice[] = []
    const priced = await db.select({
      id: contracts.id, customerId: contracts.customerId, currency: contracts.currency, termStart: contracts.termStart, termEnd: contracts.termEnd,
      cadence: plans.billingCadence, planName: plans.name, priceMinor: sql<number>`coalesce(${contracts.priceOverrideMinor}, ${plans.priceMinor})`,
    }).from(contracts).innerJoin(plans, eq(plans.id, contracts.planId))
      .where(and(eq(contracts.companyId, company.id), eq(contracts.status, 'active'), inArray(plans.billingCadence, ['yearly', 'monthly']),
        lte(contracts.termStart, addDays(today, TERM_INVOICE_LEAD_DAYS))))
      .orderBy(asc(contracts.termStart), asc(contracts.id))
    const keyed = priced.length
      ? new Set((await db.select({ key: invoices.billingKey }).from(invoices).where(and(eq(invoices.companyId, company.id), inArray(invoices.contractId, priced.map(p => p.id))))).map(r => r.key))
      : new Set<string | null>()
    // Most contracts share their terms: each term's months are worked out once.
    const monthsOf = new Map<string, ReturnType<typeof monthlyPeriods>>()
    for (const c of priced) {
      const billed = { ...c, companyId: company.id }
      if (c.cadence === 'yearly') {
        if (!keyed.has(`term:${c.id}`)) due.push(termInvoice(billed, { start: c.termStart, end: c.termEnd }))
        continue
      }
      const term = `${c.termStart}|${c.termEnd}`
      if (!monthsOf.has(term)) monthsOf.set(term, monthlyPeriods(c.termStart, c.termEnd))
      for (const p of monthsOf.get(term)!) {
        if (p.start > today) break
        if (!keyed.has(`month:${c.id}:${p.start}`)) due.push(monthInvoice(billed, p))
      }
    }
    const finishedVisits = await db.select({
      id: visits.id, customerId: visits.customerId, contractId: visits.contractId, currency: contracts.currency, scheduledOn: visits.scheduledOn, visitType: visits.visitType,
      planName: plans.name, priceMinor: sql<number>`coalesce(${contracts.priceOverrideMinor}, ${plans.priceMinor})`,
    }).from(visits).innerJoin(contracts, eq(contracts.id, visits.contractId)).innerJoin(plans, eq(plans.id, contracts.planId))
      .where(and(eq(visits.companyId, company.id), eq(visits.status, 'done'), eq(plans.billingCadence, 'per_visit'),
        notExists(db.select({ x: sql`1` }).from(invoices).where(and(eq(invoices.companyId, company.id), eq(invoices.billingKey, sql`'visit:' || ${visits.id}`))))))
      .orderBy(asc(visits.scheduledOn), asc(visits.id))
    for (const v of finishedVisits) {
      due.push(visitInvoice({ id: v.contractId!, companyId: company.id, customerId: v.customerId, currency: v.currency, planName: v.planName, priceMinor: v.priceMinor }, v))
    }
    const raised = await batched(due, invoiceBatch, b => (b.length === 1 ? b[0]!.billingKey : `invoices ${b[0]!.billingKey} … ${b.at(-1)!.billingKey} (${b.length})`),
      (tx, b) => raiseInvoicesInTx(tx, b, today))
    summary.invoicesRaised += raised.length
    timed('invoices')

    // 4. The provider's copies of due invoices that do not have one yet (or whose last try failed).
    if (paymentsConfigured()) {
      const unsynced = await db.select({ id: invoices.id }).from(invoices)
        .where(and(eq(invoices.companyId, company.id), eq(invoices.status, 'due'), isNull(invoices.providerSyncedAt))).orderBy(asc(invoices.numberYear), asc(invoices.numberSeq))
      for (const inv of unsynced) {
        const r = await syncInvoiceToProvider(inv.id)
        if (r.ok) {
          summary.providerSynced++
          units++
          opts.onUnit?.(units)
        }
        else {
          summary.providerFailed++
          errors.push({ companyId: company.id, subject: `invoice ${inv.id}`, message: `payment provider: ${r.error}` })
        }
      }
    }

    timed('provider')

    // 5. Overdue reminders: the highest stage reached, once (a missed day does not send two at once).
    const firstReminder = addDays(today, -REMINDER_DAYS[0])
    const overdueRows = await db.select({ id: invoices.id, dueDate: invoices.dueDate, stage: invoices.reminderStage }).from(invoices)
      .where(and(eq(invoices.companyId, company.id), eq(invoices.status, 'due'), lte(invoices.dueDate, firstReminder), lt(invoices.reminderStage, REMINDER_DAYS.length)))
      .orderBy(asc(invoices.dueDate), asc(invoices.id))
    const reminders = overdueRows.flatMap((r) => {
      const daysOverdue = daysBetween(r.dueDate!, today)
      const stage = reminderStageFor(daysOverdue)
      return stage > r.stage ? [{ id: r.id, stage, daysOverdue }] : []
    })
    const sent = await batched(reminders, invoiceBatch, b => (b.length === 1 ? `invoice ${b[0]!.id} reminder` : `reminders of invoices ${b[0]!.id} … ${b.at(-1)!.id} (${b.length})`),
      (tx, b) => sendRemindersInTx(tx, company.id, b))
    summary.reminders += sent.length
    timed('reminders')
  }
  seconds.total = (performance.now() - started) / 1000

  await db.update(taskRuns).set({ status: errors.length ? 'done_with_errors' : 'done', finishedAt: new Date(), summary: { ...summary }, errors: errors.slice(0, 200), processed: units })
    .where(eq(taskRuns.id, run!.id))
  return { runId: run!.id, ...summary, errors, seconds }
}

/**
 * Moves a batch of due invoices to their reminder stage (one update; an invoice paid or already at
 * that stage meanwhile is left out) and queues one e-mail per stage reached (keyed by stage, so
 * never twice) and the audit entries, inside the caller's transaction. Returns the reminders sent.
 */
async function sendRemindersInTx(tx: Tx, companyId: string, batch: ReadonlyArray<{ id: string, stage: number, daysOverdue: number }>) {
  const { rows: moved } = await tx.execute<{ id: string }>(sql`
    update invoices i set reminder_stage = r.stage, updated_at = now()
    from jsonb_to_recordset(${JSON.stringify(batch)}::jsonb) as r(id uuid, stage smallint)
    where i.id = r.id and i.company_id = ${companyId}::uuid and i.status = 'due' and i.reminder_stage < r.stage
    returning i.id`)
  const movedIds = new Set(moved.map(m => m.id))
  const sent = batch.filter(r => movedIds.has(r.id))
  await queueInvoiceMails(tx, sent.map(r => ({ invoiceId: r.id, kind: 'reminder' as const, dedupeKey: `invoice:${r.id}:reminder:${r.stage}`, daysOverdue: r.daysOverdue })))
  await recordAudits(tx, sent.map(r => ({ action: 'invoice.reminder', companyId, subjectType: 'invoice', subjectId: r.id, detail: { stage: r.stage, daysOverdue: r.daysOverdue } })))
  return sent
}

/** The last runs of the billing job that covered the company, with only that company's errors. */
export async function lastBillingRuns(companyId: string, limit = 5) {
  const rows = await useDb().select().from(taskRuns)
    .where(and(eq(taskRuns.name, BILLING_TASK), or(isNull(taskRuns.companyId), eq(taskRuns.companyId, companyId))))
    .orderBy(sql`${taskRuns.startedAt} desc`).limit(limit)
  return rows.map(r => ({ id: r.id, startedAt: r.startedAt, finishedAt: r.finishedAt, status: r.status, summary: r.summary, errors: r.errors.filter(e => e.companyId === companyId).map(({ subject, message }) => ({ subject, message })) }))
}

