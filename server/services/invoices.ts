import { and, asc, count, desc, eq, ilike, inArray, lt, ne, or, sql, type SQL } from 'drizzle-orm'
import type { InvoiceCreateInput, InvoiceLineInput, InvoiceListQuery, InvoiceUpdateInput } from '../../shared/schemas/billing'
import { INVOICE_STATUS_LABELS, PAYMENT_METHOD_LABELS, type InvoiceDocument, type InvoiceSource, type InvoiceStatus } from '../../shared/types/billing'
import { addDays, formatLocalDate, localToday } from '../../shared/utils/company-time'
import { MONEY_MAX_MINOR } from '../../shared/schemas/fields'
import { formatTaxRate, invoiceTotals } from '../../shared/utils/billing'
import { formatMoney } from '../../shared/utils/money'
import { groupRows } from '../../shared/utils/collections'
import { companies, contracts, customers, invoiceCounters, invoiceDayTotals, invoiceLines, invoices, plans } from '../db/schema'
import { isStaff, ownCustomerId, type SessionUser } from '../utils/auth'
import { useDb, type Database, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { escapeHtml } from '../utils/html'
import { containsPattern } from '../utils/like'
import { publicAppUrl } from '../utils/payments'
import { keptForCompany, versionedCache } from '../utils/versioned-cache'
import { recordAudit, recordAudits } from './audit'
import { enqueueMails, type OutgoingMail } from './mail'
import { readerContext } from './company'
import { contactEmailsOf } from './recipients'

type Db = Database | Tx
type InvoiceRow = typeof invoices.$inferSelect

/** WHERE conditions that keep a caller inside their tenancy; customers never see invoices being prepared. */
function scope(actor: SessionUser): SQL[] {
  const where: SQL[] = [eq(invoices.companyId, actor.companyId)]
  const own = ownCustomerId(actor)
  if (own) where.push(eq(invoices.customerId, own), ne(invoices.status, 'preparing'))
  return where
}

/** The state of an invoice still asking for money. */
const OPEN: InvoiceStatus = 'due'
const overdue = (today: string) => and(eq(invoices.status, OPEN), lt(invoices.dueDate, today))

const listColumns = {
  id: invoices.id, number: invoices.number, status: invoices.status, source: invoices.source,
  customerId: invoices.customerId, customerName: customers.name, contractId: invoices.contractId,
  currency: invoices.currency, subtotalMinor: invoices.subtotalMinor, taxMinor: invoices.taxMinor, totalMinor: invoices.totalMinor,
  amountPaidMinor: invoices.amountPaidMinor, issueDate: invoices.issueDate, dueDate: invoices.dueDate,
  periodStart: invoices.periodStart, periodEnd: invoices.periodEnd, sentAt: invoices.sentAt, paidAt: invoices.paidAt,
  reminderStage: invoices.reminderStage, providerError: invoices.providerError, lastPaymentError: invoices.lastPaymentError,
}

/** The company's today, from the time zone read with the session (no query of its own). */
async function companyToday(actor: SessionUser) {
  return localToday((await readerContext(actor)).timeZone)
}

function listWhere(actor: SessionUser, q: Omit<InvoiceListQuery, 'page' | 'pageSize'>, today: string) {
  const where = scope(actor)
  if (q.status === 'overdue') where.push(overdue(today)!)
  else if (q.status) where.push(eq(invoices.status, q.status))
  if (q.customerId) where.push(eq(invoices.customerId, q.customerId))
  if (q.contractId) where.push(eq(invoices.contractId, q.contractId))
  if (q.from) where.push(sql`${invoices.issueDate} >= ${q.from}`)
  if (q.to) where.push(sql`${invoices.issueDate} <= ${q.to}`)
  if (q.q) where.push(or(ilike(customers.name, containsPattern(q.q)), ilike(invoices.number, containsPattern(q.q)))!)
  return and(...where)
}

function listOrder(q: Pick<InvoiceListQuery, 'sort' | 'dir'>) {
  const col = { number: invoices.number, issueDate: invoices.issueDate, dueDate: invoices.dueDate, total: invoices.totalMinor, status: invoices.status, customer: customers.name }[q.sort]
  const dir = q.dir === 'desc' ? desc : asc
  // Plain column order, ties by number then id in the same direction, so one (company, column,
  // number_year, number_seq, id) index serves a page both ways without sorting; drafts (no number
  // or dates yet) come first when sorting newest first, last when oldest first.
  return [dir(col), dir(invoices.numberYear), dir(invoices.numberSeq), dir(invoices.id)]
}

/**
 * The count and sums of the filtered set from `invoice_day_totals` (a few hundred rows, not every
 * invoice) when the filters are ones it keeps: state, overdue and issue dates, for staff. Null
 * when a filter needs the invoices themselves (a customer, contract or search).
 */
async function listTotalsFromDays(actor: SessionUser, q: InvoiceListQuery, today: string) {
  if (q.q || q.customerId || q.contractId || ownCustomerId(actor)) return null
  const t = invoiceDayTotals
  const where: SQL[] = [eq(t.companyId, actor.companyId)]
  if (q.status === 'overdue') where.push(eq(t.status, OPEN), lt(t.dueDate, today))
  else if (q.status) where.push(eq(t.status, q.status))
  if (q.from) where.push(sql`${t.issueDate} >= ${q.from}`)
  if (q.to) where.push(sql`${t.issueDate} <= ${q.to}`)
  const rows = await useDb().select({
    currency: t.currency, invoices: sql<number>`sum(${t.invoices})::int`, totalMinor: sql<number>`sum(${t.totalMinor})::bigint`,
    dueMinor: sql<number>`sum(case when ${t.status} = ${OPEN} then ${t.totalMinor} - ${t.amountPaidMinor} else 0 end)::bigint`,
  }).from(t).where(and(...where)).groupBy(t.currency).orderBy(t.currency)
  return {
    total: rows.reduce((n, r) => n + Number(r.invoices), 0),
    sums: rows.map(r => ({ currency: r.currency, totalMinor: Number(r.totalMinor), dueMinor: Number(r.dueMinor) })),
  }
}

async function listTotalsFromInvoices(q: InvoiceListQuery, cond: SQL | undefined) {
  const db = useDb()
  const sumColumns = { currency: invoices.currency, totalMinor: sql<number>`coalesce(sum(${invoices.totalMinor}), 0)::bigint`, dueMinor: sql<number>`coalesce(sum(case when ${invoices.status} = ${OPEN} then ${invoices.totalMinor} - ${invoices.amountPaidMinor} else 0 end), 0)::bigint` }
  // Counting and summing need the customer join only when searching by name.
  const countQuery = db.select({ n: count() }).from(invoices).$dynamic()
  const sumQuery = db.select(sumColumns).from(invoices).$dynamic()
  if (q.q) for (const query of [countQuery, sumQuery]) query.innerJoin(customers, eq(customers.id, invoices.customerId))
  const [[total], totals] = await Promise.all([
    countQuery.where(cond),
    // What the filtered set adds up to, per currency (a company normally has one).
    sumQuery.where(cond).groupBy(invoices.currency).orderBy(invoices.currency),
  ])
  return { total: total?.n ?? 0, sums: totals.map(t => ({ currency: t.currency, totalMinor: Number(t.totalMinor), dueMinor: Number(t.dueMinor) })) }
}

export async function listInvoices(actor: SessionUser, q: InvoiceListQuery): Promise<InvoiceList> {
  const today = await companyToday(actor)
  return keptForCompany(invoiceLists, actor.companyId, ['invoices', 'customers'], `${ownCustomerId(actor) ?? ''}|${today}|${JSON.stringify(q)}`, () => buildInvoiceList(actor, q, today))
}

export type InvoiceList = Awaited<ReturnType<typeof buildInvoiceList>>
/** Pages kept per process until the company's invoices or customers change (server/utils/versioned-cache.ts); the company's date is part of the key. */
const invoiceLists = versionedCache<InvoiceList>(1000)

async function buildInvoiceList(actor: SessionUser, q: InvoiceListQuery, today: string) {
  const cond = listWhere(actor, q, today)
  const [rows, totals] = await Promise.all([
    useDb().select(listColumns).from(invoices).innerJoin(customers, eq(customers.id, invoices.customerId))
      .where(cond).orderBy(...listOrder(q)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    listTotalsFromDays(actor, q, today).then(t => t ?? listTotalsFromInvoices(q, cond)),
  ])
  return {
    rows: rows.map(r => ({ ...r, overdue: r.status === OPEN && r.dueDate != null && r.dueDate < today })),
    total: totals.total, page: q.page, pageSize: q.pageSize, today, sums: totals.sums,
  }
}

export const EXPORT_LIMIT = 50_000
const EXPORT_COLUMNS = ['number', 'status', 'customer', 'issue_date', 'due_date', 'period_start', 'period_end', 'currency', 'subtotal', 'tax', 'total', 'paid', 'due', 'paid_at', 'payment_method'] as const

function csvCell(v: unknown): string {
  const s = v == null ? '' : String(v)
  // Quote when needed; a leading = + - @ would run as a formula in a spreadsheet, so prefix it.
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe
}

const decimal = (minor: number) => (minor / 100).toFixed(2)

/** The filtered invoices as CSV (amounts as decimals in the invoice's currency), at most EXPORT_LIMIT rows. */
export async function exportInvoicesCsv(actor: SessionUser, q: Omit<InvoiceListQuery, 'page' | 'pageSize'>) {
  const today = await companyToday(actor)
  const rows = await useDb().select({ ...listColumns, paymentMethod: invoices.paymentMethod }).from(invoices).innerJoin(customers, eq(customers.id, invoices.customerId))
    .where(listWhere(actor, q, today)).orderBy(...listOrder(q)).limit(EXPORT_LIMIT + 1)
  if (rows.length > EXPORT_LIMIT) throw httpError(400, `Invalid query: more than ${EXPORT_LIMIT} invoices match; narrow the dates or the status`, { fields: { from: 'Narrow the dates' } })
  const lines = [EXPORT_COLUMNS.join(',')]
  for (const r of rows) {
    lines.push([
      r.number, INVOICE_STATUS_LABELS[r.status], r.customerName, r.issueDate, r.dueDate, r.periodStart, r.periodEnd, r.currency,
      decimal(r.subtotalMinor), decimal(r.taxMinor), decimal(r.totalMinor), decimal(r.amountPaidMinor),
      decimal(r.status === 'due' ? r.totalMinor - r.amountPaidMinor : 0), r.paidAt?.toISOString() ?? '', r.paymentMethod ?? '',
    ].map(csvCell).join(','))
  }
  return `${lines.join('\r\n')}\r\n`
}

async function loadInvoice(actor: SessionUser, id: string, db: Db = useDb()) {
  const [row] = await db.select().from(invoices).where(and(eq(invoices.id, id), ...scope(actor))).limit(1)
  if (!row) throw httpError(404, 'No such invoice')
  return row
}

function invoiceLineRows(db: Db, invoiceId: string) {
  return db.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, invoiceId)).orderBy(asc(invoiceLines.position))
}

type CompanyRow = typeof companies.$inferSelect
type CustomerRow = typeof customers.$inferSelect
type LineRow = typeof invoiceLines.$inferSelect

/** The invoice as it is shown and printed. */
export async function invoiceDocument(inv: InvoiceRow, db: Db = useDb(), preloadedLines?: LineRow[]): Promise<InvoiceDocument> {
  const [c] = await db.select().from(companies).where(eq(companies.id, inv.companyId)).limit(1)
  const [cu] = await db.select().from(customers).where(eq(customers.id, inv.customerId)).limit(1)
  return buildInvoiceDocument(inv, c!, cu!, preloadedLines ?? await invoiceLineRows(db, inv.id))
}

/** The document of an invoice from its rows (no I/O): what invoiceDocument returns, for batches that load the rows together. */
function buildInvoiceDocument(inv: InvoiceRow, c: CompanyRow, cu: CustomerRow, lines: readonly LineRow[]): InvoiceDocument {
  const cityLine = [cu.billingCity, [cu.billingRegion, cu.billingPostcode].filter(Boolean).join(' ')].filter(Boolean).join(', ')
  const paidNote = inv.status === 'paid' && inv.paymentMethod
    ? `${PAYMENT_METHOD_LABELS[inv.paymentMethod as keyof typeof PAYMENT_METHOD_LABELS] ?? inv.paymentMethod}${inv.paymentReference ? `, ref. ${inv.paymentReference}` : ''}`
    : null
  return {
    number: inv.number, status: inv.status, currency: inv.currency, issueDate: inv.issueDate, dueDate: inv.dueDate,
    periodStart: inv.periodStart, periodEnd: inv.periodEnd,
    company: { name: c.name, addressLines: c.address.split('\n').map(s => s.trim()).filter(Boolean), email: c.billingEmail || null },
    customer: { name: cu.name, addressLines: [cu.billingLine1, cu.billingLine2, cityLine].filter(Boolean) },
    lines: lines.map(l => ({ description: l.description, quantity: l.quantity, unitPriceMinor: l.unitPriceMinor, amountMinor: l.amountMinor, taxable: l.taxable })),
    subtotalMinor: inv.subtotalMinor, taxRateBasisPoints: inv.taxRateBasisPoints, taxMinor: inv.taxMinor, totalMinor: inv.totalMinor,
    amountPaidMinor: inv.amountPaidMinor, amountDueMinor: inv.status === 'due' ? inv.totalMinor - inv.amountPaidMinor : 0,
    paidAt: inv.paidAt ? localToday(c.timeZone, inv.paidAt) : null, paymentNote: paidNote, notes: inv.notes,
  }
}

export async function getInvoice(actor: SessionUser, id: string) {
  const db = useDb()
  const inv = await loadInvoice(actor, id)
  const lineRows = await invoiceLineRows(db, id)
  const document = await invoiceDocument(inv, db, lineRows)
  const today = await companyToday(actor)
  const lines = lineRows.map(l => ({ id: l.id, kind: l.kind, description: l.description, quantity: l.quantity, unitPriceMinor: l.unitPriceMinor, amountMinor: l.amountMinor, taxable: l.taxable }))
  const [contract] = inv.contractId
    ? await db.select({ id: contracts.id, planName: plans.name, termStart: contracts.termStart, termEnd: contracts.termEnd }).from(contracts).innerJoin(plans, eq(plans.id, contracts.planId)).where(eq(contracts.id, inv.contractId)).limit(1)
    : []
  const base = {
    id: inv.id, number: inv.number, status: inv.status, source: inv.source, customerId: inv.customerId, customerName: document.customer.name,
    contract: contract ?? null, currency: inv.currency, issueDate: inv.issueDate, dueDate: inv.dueDate, periodStart: inv.periodStart, periodEnd: inv.periodEnd,
    subtotalMinor: inv.subtotalMinor, taxRateBasisPoints: inv.taxRateBasisPoints, taxMinor: inv.taxMinor, totalMinor: inv.totalMinor,
    amountPaidMinor: inv.amountPaidMinor, amountDueMinor: document.amountDueMinor, notes: inv.notes, lines,
    sentAt: inv.sentAt, paidAt: inv.paidAt, cancelledAt: inv.cancelledAt, writtenOffAt: inv.writtenOffAt,
    paymentMethod: inv.paymentMethod, paymentReference: inv.paymentReference, lastPaymentError: inv.lastPaymentError,
    overdue: inv.status === 'due' && inv.dueDate != null && inv.dueDate < today, today, document,
  }
  if (!isStaff(actor)) return { ...base, staff: null }
  return { ...base, staff: { billingKey: inv.billingKey, reminderStage: inv.reminderStage, providerInvoiceId: inv.providerInvoiceId, providerSyncedAt: inv.providerSyncedAt, providerError: inv.providerError, paymentMismatch: inv.paymentMismatch, issuedAt: inv.finalizedAt } }
}

/** The invoice arithmetic of `lines`, refused (400) when an amount is more than an invoice can hold. */
function checkedTotals(input: readonly InvoiceLineInput[], taxRateBasisPoints: number) {
  const totals = invoiceTotals(input, taxRateBasisPoints)
  const amounts = [totals.subtotalMinor, totals.taxMinor, totals.totalMinor, ...totals.lines.map(l => l.amountMinor)]
  if (amounts.some(a => Math.abs(a) > MONEY_MAX_MINOR)) {
    const message = 'The invoice total is more than an invoice can hold; split the lines over several invoices'
    throw httpError(400, `Invalid body: lines — ${message}`, { fields: { lines: message } })
  }
  return totals
}

/** Replaces the lines of an invoice being prepared and recomputes its totals from them (tax rounded once; see shared/utils/billing). */
export async function writeLines(tx: Tx, invoiceId: string, taxRateBasisPoints: number, input: readonly InvoiceLineInput[]) {
  const totals = checkedTotals(input, taxRateBasisPoints)
  await tx.delete(invoiceLines).where(eq(invoiceLines.invoiceId, invoiceId))
  await tx.insert(invoiceLines).values(input.map((l, position) => ({
    invoiceId, position, kind: l.kind, description: l.description, quantity: l.quantity, unitPriceMinor: l.unitPriceMinor,
    amountMinor: totals.lines[position]!.amountMinor, taxable: l.taxable,
  })))
  await tx.update(invoices).set({ subtotalMinor: totals.subtotalMinor, taxMinor: totals.taxMinor, totalMinor: totals.totalMinor }).where(eq(invoices.id, invoiceId))
  return totals
}

export interface NewInvoice {
  companyId: string
  customerId: string
  contractId?: string | null
  visitId?: string | null
  source: InvoiceSource
  billingKey?: string | null
  currency: string
  periodStart?: string | null
  periodEnd?: string | null
  notes?: string
  lines: InvoiceLineInput[]
}

/**
 * Inserts a draft with its lines inside the caller's transaction. With a `billingKey` the insert
 * is skipped when that key exists (returns null): a contract period is billed once.
 */
export async function insertDraft(tx: Tx, n: NewInvoice): Promise<string | null> {
  const [c] = await tx.select({ taxRateBasisPoints: companies.taxRateBasisPoints }).from(companies).where(eq(companies.id, n.companyId)).limit(1)
  const [row] = await tx.insert(invoices).values({
    companyId: n.companyId, customerId: n.customerId, contractId: n.contractId ?? null, visitId: n.visitId ?? null,
    source: n.source, billingKey: n.billingKey ?? null, currency: n.currency, taxRateBasisPoints: c!.taxRateBasisPoints,
    periodStart: n.periodStart ?? null, periodEnd: n.periodEnd ?? null, notes: n.notes ?? '',
  }).onConflictDoNothing({ target: [invoices.companyId, invoices.billingKey] }).returning({ id: invoices.id })
  if (!row) return null
  await writeLines(tx, row.id, c!.taxRateBasisPoints, n.lines)
  return row.id
}

/** An invoice the billing job raises: always keyed, so it is raised once per cause. */
export type KeyedInvoice = NewInvoice & { billingKey: string }

/**
 * Raises many invoices at once inside the caller's transaction (the billing job's batches): each
 * is inserted already issued (numbered, dated, sent) unless its `billingKey` exists, with one
 * insert for the invoices, one counter update per company for their numbers (gapless, in the
 * order given), one insert of their lines, one of their e-mails and one of their audit entries.
 * Returns the ids of the invoices made, in the order given; those whose key existed are skipped.
 */
export async function raiseInvoicesInTx(tx: Tx, list: readonly KeyedInvoice[], today: string): Promise<string[]> {
  if (!list.length) return []
  const companyRows = await tx.select({ id: companies.id, taxRateBasisPoints: companies.taxRateBasisPoints, terms: companies.paymentTermsDays })
    .from(companies).where(inArray(companies.id, [...new Set(list.map(n => n.companyId))]))
  const companyOf = new Map(companyRows.map(c => [c.id, c]))
  const now = new Date().toISOString()
  const drafts = list.map((n) => {
    const c = companyOf.get(n.companyId)!
    const totals = checkedTotals(n.lines, c.taxRateBasisPoints)
    if (!n.lines.length) throw httpError(400, 'Invalid body: lines — an invoice needs at least one line', { fields: { lines: 'An invoice needs at least one line' } })
    if (totals.totalMinor < 0) throw httpError(400, 'Invalid body: lines — the total cannot be below zero', { fields: { lines: 'The total cannot be below zero' } })
    return { n, totals, row: {
      company_id: n.companyId, customer_id: n.customerId, contract_id: n.contractId ?? null, visit_id: n.visitId ?? null, source: n.source,
      billing_key: n.billingKey, currency: n.currency, tax_rate_bp: c.taxRateBasisPoints, subtotal_minor: totals.subtotalMinor, tax_minor: totals.taxMinor,
      total_minor: totals.totalMinor, issue_date: today, due_date: addDays(today, c.terms), period_start: n.periodStart ?? null, period_end: n.periodEnd ?? null,
      notes: n.notes ?? '', finalized_at: now, sent_at: now,
    } }
  })
  // Due from the start, so the day totals' trigger counts each once; the numbers follow below
  // (their columns are not the trigger's), and nothing outside this transaction sees the gap.
  const { rows: made } = await tx.execute<{ id: string, company_id: string, billing_key: string }>(sql`
    insert into invoices (company_id, customer_id, contract_id, visit_id, source, billing_key, status, currency, tax_rate_bp, subtotal_minor, tax_minor, total_minor,
      issue_date, due_date, period_start, period_end, notes, finalized_at, sent_at)
    select d.company_id, d.customer_id, d.contract_id, d.visit_id, d.source::invoice_source, d.billing_key, 'due', d.currency, d.tax_rate_bp, d.subtotal_minor, d.tax_minor, d.total_minor,
      d.issue_date, d.due_date, d.period_start, d.period_end, d.notes, d.finalized_at, d.sent_at
    from jsonb_to_recordset(${JSON.stringify(drafts.map(d => d.row))}::jsonb) as d(company_id uuid, customer_id uuid, contract_id uuid, visit_id uuid, source text, billing_key text,
      currency text, tax_rate_bp integer, subtotal_minor integer, tax_minor integer, total_minor integer, issue_date date, due_date date, period_start date, period_end date,
      notes text, finalized_at timestamptz, sent_at timestamptz)
    on conflict (company_id, billing_key) do nothing
    returning id, company_id, billing_key`)
  if (!made.length) return []
  const idOf = new Map(made.map(m => [`${m.company_id}|${m.billing_key}`, m.id]))
  const created = drafts.flatMap(d => {
    const id = idOf.get(`${d.n.companyId}|${d.n.billingKey}`)
    return id ? [{ ...d, id }] : []
  })
  const year = Number(today.slice(0, 4))
  const numbers: Array<{ id: string, number: string, seq: number }> = []
  for (const [companyId, mine] of groupRows(created, c => c.n.companyId)) {
    const first = await takeInvoiceNumbers(tx, companyId, year, mine.length)
    mine.forEach((c, i) => numbers.push({ id: c.id, number: invoiceNumber(year, first + i), seq: first + i }))
  }
  await tx.execute(sql`
    update invoices i set number = v.number, number_year = ${year}, number_seq = v.seq
    from jsonb_to_recordset(${JSON.stringify(numbers)}::jsonb) as v(id uuid, number text, seq integer) where i.id = v.id`)
  await tx.insert(invoiceLines).values(created.flatMap(c => c.n.lines.map((l, position) => ({
    invoiceId: c.id, position, kind: l.kind, description: l.description, quantity: l.quantity, unitPriceMinor: l.unitPriceMinor,
    amountMinor: c.totals.lines[position]!.amountMinor, taxable: l.taxable,
  }))))
  await queueInvoiceMails(tx, created.map(c => ({ invoiceId: c.id, kind: 'invoice' as const, dedupeKey: `invoice:${c.id}:sent` })))
  await recordAudits(tx, created.map(c => ({ action: 'invoice.raised', companyId: c.n.companyId, subjectType: 'invoice', subjectId: c.id, detail: { billingKey: c.n.billingKey } })))
  return created.map(c => c.id)
}

/**
 * Issues an invoice being prepared: takes the next number of the issue year from the company's counter (its row lock
 * makes numbers gapless: a rolled-back issue gives its number back), sets the issue and due
 * dates from the payment terms. Inside the caller's transaction.
 */
export async function finalizeInTx(tx: Tx, invoiceId: string, today?: string) {
  const [inv] = await tx.select().from(invoices).where(eq(invoices.id, invoiceId)).for('update').limit(1)
  if (!inv) throw httpError(404, 'No such invoice')
  if (inv.status !== 'preparing') throw httpError(409, `This invoice is ${INVOICE_STATUS_LABELS[inv.status].toLowerCase()}; only one being prepared can be issued`)
  if (inv.totalMinor < 0) throw httpError(400, 'Invalid body: lines — the total cannot be below zero', { fields: { lines: 'The total cannot be below zero' } })
  const [{ n }] = await tx.select({ n: count() }).from(invoiceLines).where(eq(invoiceLines.invoiceId, invoiceId)) as [{ n: number }]
  if (n === 0) throw httpError(400, 'Invalid body: lines — an invoice needs at least one line', { fields: { lines: 'An invoice needs at least one line' } })
  const [c] = await tx.select({ timeZone: companies.timeZone, terms: companies.paymentTermsDays }).from(companies).where(eq(companies.id, inv.companyId)).limit(1)
  const issueDate = today ?? localToday(c!.timeZone)
  const year = Number(issueDate.slice(0, 4))
  const seq = await takeInvoiceNumbers(tx, inv.companyId, year, 1)
  const number = invoiceNumber(year, seq)
  await tx.update(invoices).set({
    status: 'due', number, numberYear: year, numberSeq: seq, issueDate, dueDate: addDays(issueDate, c!.terms), finalizedAt: new Date(),
  }).where(eq(invoices.id, invoiceId))
  return { number, issueDate }
}

/**
 * Takes the next `count` numbers of a company's year from its counter inside the caller's
 * transaction and returns the first sequence number. The counter row stays locked until the
 * transaction ends, so numbers are gapless: a rolled-back issue gives its numbers back.
 */
async function takeInvoiceNumbers(tx: Tx, companyId: string, year: number, count: number): Promise<number> {
  const [counter] = await tx.insert(invoiceCounters).values({ companyId, year, lastSeq: count })
    .onConflictDoUpdate({ target: [invoiceCounters.companyId, invoiceCounters.year], set: { lastSeq: sql`${invoiceCounters.lastSeq} + ${count}` } })
    .returning({ seq: invoiceCounters.lastSeq })
  return counter!.seq - count + 1
}

const invoiceNumber = (year: number, seq: number) => `${year}-${String(seq).padStart(4, '0')}`

const fmtDate = (d: string) => formatLocalDate(d, 'longDate')

type MailKind = 'invoice' | 'reminder' | 'receipt'
/** Queues an invoice e-mail (the invoice, an overdue reminder, or a receipt) inside the caller's transaction. */
export async function queueInvoiceMail(tx: Tx, invoiceId: string, kind: MailKind, dedupeKey: string, extra: { daysOverdue?: number } = {}) {
  return (await queueInvoiceMails(tx, [{ invoiceId, kind, dedupeKey, ...extra }]))[0] ?? null
}

export interface InvoiceMailRequest { invoiceId: string, kind: MailKind, dedupeKey: string, daysOverdue?: number }

/**
 * Queues many invoice e-mails (the billing job's batches): the invoices, their companies,
 * customers, lines and invoice contacts are read with one query each, and the messages go into
 * the outbox with one insert. Returns the outbox id of each (null: not numbered, no recipient, or
 * already queued), in the order asked.
 */
export async function queueInvoiceMails(tx: Tx, requests: readonly InvoiceMailRequest[]): Promise<Array<string | null>> {
  if (!requests.length) return []
  const ids = [...new Set(requests.map(r => r.invoiceId))]
  const invoiceRows = await tx.select().from(invoices).where(inArray(invoices.id, ids))
  const invoiceOf = new Map(invoiceRows.map(i => [i.id, i]))
  const numbered = invoiceRows.filter(i => i.number)
  if (!numbered.length) return requests.map(() => null)
  const companyRows = await tx.select().from(companies).where(inArray(companies.id, [...new Set(numbered.map(i => i.companyId))]))
  const customerIds = [...new Set(numbered.map(i => i.customerId))]
  const customerRows = await tx.select().from(customers).where(inArray(customers.id, customerIds))
  const lineRows = await tx.select().from(invoiceLines).where(inArray(invoiceLines.invoiceId, numbered.map(i => i.id))).orderBy(asc(invoiceLines.invoiceId), asc(invoiceLines.position))
  const recipients = await contactEmailsOf(tx, customerIds, 'invoices')
  const companyOf = new Map(companyRows.map(c => [c.id, c]))
  const customerOf = new Map(customerRows.map(c => [c.id, c]))
  const linesOf = groupRows(lineRows, l => l.invoiceId)
  const wanted = requests.flatMap((r) => {
    const inv = invoiceOf.get(r.invoiceId)
    if (!inv?.number) return []
    const doc = buildInvoiceDocument(inv, companyOf.get(inv.companyId)!, customerOf.get(inv.customerId)!, linesOf.get(inv.id) ?? [])
    return [{ r, message: invoiceMessage(inv, doc, recipients.get(inv.customerId) ?? [], r) }]
  })
  const queued = await enqueueMails(tx, wanted.map(w => w.message))
  const idOf = new Map(wanted.map((w, i) => [w.r, queued[i] ?? null]))
  return requests.map(r => idOf.get(r) ?? null)
}

/** The e-mail of one invoice (no I/O). */
function invoiceMessage(inv: InvoiceRow, doc: InvoiceDocument, to: string[], req: InvoiceMailRequest): OutgoingMail {
  const { kind, dedupeKey } = req
  const money = (m: number) => formatMoney(m, inv.currency)
  const link = `${publicAppUrl()}/portal/invoices/${inv.id}`
  const pdf = `${publicAppUrl()}/api/invoices/${inv.id}/pdf`
  const subject = {
    invoice: `Invoice ${inv.number} from ${doc.company.name}: ${money(doc.totalMinor)} due ${fmtDate(inv.dueDate!)}`,
    reminder: `Reminder: invoice ${inv.number} is ${req.daysOverdue} days overdue (${money(doc.amountDueMinor)})`,
    receipt: `Payment received for invoice ${inv.number}, thank you`,
  }[kind]
  const intro = {
    invoice: `Here is invoice ${inv.number} for ${money(doc.totalMinor)}, due on ${fmtDate(inv.dueDate!)}.`,
    reminder: `Invoice ${inv.number} was due on ${fmtDate(inv.dueDate!)} and ${money(doc.amountDueMinor)} is still unpaid. If you have paid it already, thank you and please ignore this reminder.`,
    receipt: `We received your payment of ${money(inv.amountPaidMinor)} for invoice ${inv.number}${doc.paymentNote ? ` (${doc.paymentNote})` : ''}. Thank you.`,
  }[kind]
  const lineText = doc.lines.map(l => `  ${l.description} — ${money(l.amountMinor)}`)
  const totalsText = [`  Subtotal ${money(doc.subtotalMinor)}`, `  Tax (${formatTaxRate(doc.taxRateBasisPoints)}) ${money(doc.taxMinor)}`, `  Total ${money(doc.totalMinor)}`]
  const action = kind === 'receipt' ? 'See the invoice' : 'View and pay the invoice'
  const text = [`Hello ${doc.customer.name},`, '', intro, '', ...lineText, ...totalsText, '', `${action}: ${link}`, `PDF: ${pdf}`, '', `— ${doc.company.name}`].join('\n')
  const html = `<p>Hello ${escapeHtml(doc.customer.name)},</p><p>${escapeHtml(intro)}</p>
<table cellpadding="4" style="border-collapse:collapse">${doc.lines.map(l => `<tr><td>${escapeHtml(l.description)}</td><td align="right">${escapeHtml(money(l.amountMinor))}</td></tr>`).join('')}
<tr><td>Subtotal</td><td align="right">${escapeHtml(money(doc.subtotalMinor))}</td></tr>
<tr><td>Tax (${escapeHtml(formatTaxRate(doc.taxRateBasisPoints))})</td><td align="right">${escapeHtml(money(doc.taxMinor))}</td></tr>
<tr><td><strong>Total</strong></td><td align="right"><strong>${escapeHtml(money(doc.totalMinor))}</strong></td></tr></table>
<p><a href="${escapeHtml(link)}">${action}</a> · <a href="${escapeHtml(pdf)}">PDF</a></p><p>— ${escapeHtml(doc.company.name)}</p>`
  return { companyId: inv.companyId, dedupeKey, to, subject, html, text }
}

/** Marks a due invoice sent and queues its e-mail; `dedupeKey` keeps a retried run from sending twice. */
export async function sendInTx(tx: Tx, invoiceId: string, dedupeKey: string) {
  const queued = await queueInvoiceMail(tx, invoiceId, 'invoice', dedupeKey)
  await tx.update(invoices).set({ sentAt: new Date() }).where(eq(invoices.id, invoiceId))
  return queued
}

export async function createInvoice(actor: SessionUser, input: InvoiceCreateInput, ip: string) {
  const db = useDb()
  const [cu] = await db.select({ id: customers.id }).from(customers).where(and(eq(customers.id, input.customerId), eq(customers.companyId, actor.companyId))).limit(1)
  if (!cu) throw httpError(400, 'Invalid body: customerId — no such customer', { fields: { customerId: 'No such customer' } })
  if (input.contractId) {
    const [ct] = await db.select({ id: contracts.id }).from(contracts).where(and(eq(contracts.id, input.contractId), eq(contracts.customerId, input.customerId), eq(contracts.companyId, actor.companyId))).limit(1)
    if (!ct) throw httpError(400, 'Invalid body: contractId — no such contract for this customer', { fields: { contractId: 'No such contract for this customer' } })
  }
  const [company] = await db.select({ currency: companies.currency }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  const id = await db.transaction(async (tx) => {
    const created = await insertDraft(tx, {
      companyId: actor.companyId, customerId: input.customerId, contractId: input.contractId ?? null, source: 'manual',
      currency: company!.currency, periodStart: input.periodStart, periodEnd: input.periodEnd, notes: input.notes, lines: input.lines,
    })
    await recordAudit(tx, { action: 'invoice.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'invoice', subjectId: created!, ip })
    return created!
  })
  return getInvoice(actor, id)
}

export async function updateInvoice(actor: SessionUser, id: string, input: InvoiceUpdateInput, ip: string) {
  await useDb().transaction(async (tx) => {
    const [inv] = await tx.select().from(invoices).where(and(eq(invoices.id, id), ...scope(actor))).for('update').limit(1)
    if (!inv) throw httpError(404, 'No such invoice')
    if (inv.status !== 'preparing') throw httpError(409, `This invoice is ${INVOICE_STATUS_LABELS[inv.status].toLowerCase()}; only one being prepared can change (cancel it and raise a new one)`)
    if (input.notes !== undefined) await tx.update(invoices).set({ notes: input.notes }).where(eq(invoices.id, id))
    if (input.lines) await writeLines(tx, id, inv.taxRateBasisPoints, input.lines)
    await recordAudit(tx, { action: 'invoice.updated', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'invoice', subjectId: id, ip, detail: { lines: input.lines?.length } })
  })
  return getInvoice(actor, id)
}

/** The invoice the PDF route renders, within the caller's tenancy (invoices being prepared only for staff). */
export async function invoiceForPdf(actor: SessionUser, id: string) {
  const inv = await loadInvoice(actor, id)
  return { document: await invoiceDocument(inv), fileName: `invoice-${inv.number ?? 'being-prepared'}.pdf` }
}

export { loadInvoice, overdue, companyToday }
