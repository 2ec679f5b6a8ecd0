// A small hand-built company for the billing tests, written straight into the test database:
// its own owner and customers, three plans, six contracts and four open invoices, so every
// figure the billing job and the revenue view produce can be worked out by hand (see billing.test.ts).
import { spawn } from 'node:child_process'
import { resolve } from 'node:path'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { inject } from 'vitest'
import * as schema from '../../server/db/schema'
import { hashPassword } from '../../server/utils/password'
import { DEMO_PASSWORD } from './api'

const root = resolve(import.meta.dirname, '../..')
let pool: pg.Pool | undefined
export function testDb() {
  pool ??= new pg.Pool({ connectionString: inject('databaseUrl'), max: 3 })
  return drizzle(pool, { schema })
}
export async function closeTestDb() {
  await pool?.end()
  pool = undefined
}

/** The day the billing job is run "as of" in these tests (company-local). */
export const BOOK_TODAY = '2027-03-10'

export interface Book {
  companyId: string
  ownerEmail: string
  customerEmail: string
  customerLoginEmail: string
  contracts: Record<'k1' | 'k2' | 'k3' | 'k4' | 'k5', string>
  overdue: Record<'i1' | 'i2' | 'i3' | 'i4', string>
}

export async function buildBook(label: string): Promise<Book> {
  const db = testDb()
  const tag = `${label}-${Date.now().toString(36)}`
  return db.transaction(async (tx) => {
    const [company] = await tx.insert(schema.companies).values({
      name: `Reedwater Test ${tag}`, currency: 'USD', taxRateBasisPoints: 800, unitSystem: 'us', timeZone: 'America/Chicago', paymentTermsDays: 14,
    }).returning()
    const companyId = company!.id
    const passwordHash = await hashPassword(DEMO_PASSWORD)
    const ownerEmail = `owner-${tag}@reedwater.example`
    await tx.insert(schema.users).values({ companyId, email: ownerEmail, name: 'Book Owner', role: 'owner', passwordHash })
    const [cust] = await tx.insert(schema.customers).values({ companyId, name: `Book Household ${tag}`, billingLine1: '2 Osier Lane', billingCity: 'Fenbrook' }).returning()
    const customerEmail = `billing-${tag}@household.example`
    await tx.insert(schema.customerContacts).values({ customerId: cust!.id, name: 'Book Payer', email: customerEmail, getsInvoices: true })
    const customerLoginEmail = `login-${tag}@household.example`
    await tx.insert(schema.users).values({ companyId, email: customerLoginEmail, name: 'Book Payer', role: 'customer', customerId: cust!.id, passwordHash })
    const [site] = await tx.insert(schema.sites).values({ companyId, customerId: cust!.id, name: 'Back garden', line1: '2 Osier Lane', city: 'Fenbrook' }).returning()
    const [feature] = await tx.insert(schema.waterFeatures).values({
      companyId, customerId: cust!.id, siteId: site!.id, name: 'Lily pond', kind: 'water_garden',
      shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.6 }, surfaceAreaM2: 6, computedVolumeL: 3600, equipment: {} as never,
    }).returning()
    const plan = async (name: string, priceMinor: number, billingCadence: 'yearly' | 'monthly' | 'per_visit') => {
      const [p] = await tx.insert(schema.plans).values({ companyId, name, priceMinor, currency: 'USD', billingCadence, termMonths: 12 }).returning()
      await tx.insert(schema.planVisitTemplates).values({ planId: p!.id, visitType: 'routine', rrule: 'FREQ=MONTHLY;INTERVAL=3;BYMONTHDAY=10', durationMinutes: 60 })
      return p!.id
    }
    const yearly = await plan('Book Yearly', 120_000, 'yearly')
    const monthly = await plan('Book Monthly', 10_000, 'monthly')
    const perVisit = await plan('Book Per Visit', 25_000, 'per_visit')
    const contract = async (planId: string, termStart: string, termEnd: string, autoRenew: boolean, priceOverrideMinor: number | null = null) => {
      const [c] = await tx.insert(schema.contracts).values({ companyId, customerId: cust!.id, planId, status: 'active', termStart, termEnd, autoRenew, currency: 'USD', priceOverrideMinor, activatedAt: new Date(`${termStart}T15:00:00Z`) }).returning()
      await tx.insert(schema.contractFeatures).values({ contractId: c!.id, featureId: feature!.id })
      return c!.id
    }
    const k1 = await contract(yearly, '2026-04-01', '2027-03-31', true) // renews: next term starts within 30 days
    const k2 = await contract(yearly, '2026-04-05', '2027-04-04', false, 60_000) // asks first: not renewed
    const k3 = await contract(monthly, '2026-12-15', '2027-12-14', true) // months from Jan 15 and Feb 15 are due
    const k4 = await contract(perVisit, '2026-06-01', '2027-05-31', true) // two finished visits to bill
    const k5 = await contract(yearly, '2026-03-06', '2027-03-05', false, 90_000) // term over: ended
    // History already billed: the yearly terms and K3's first month (paid).
    let seq = 0
    const invoice = async (v: Partial<typeof schema.invoices.$inferInsert> & { totalMinor: number }) => {
      seq++
      const number = `2027-${String(seq).padStart(4, '0')}`
      const [row] = await tx.insert(schema.invoices).values({
        companyId, customerId: cust!.id, currency: 'USD', taxRateBasisPoints: 800, number, numberYear: 2027, numberSeq: seq, subtotalMinor: Math.round(v.totalMinor / 1.08), taxMinor: v.totalMinor - Math.round(v.totalMinor / 1.08),
        source: 'manual', status: 'due', providerSyncedAt: new Date(), ...v,
      }).returning()
      await tx.insert(schema.invoiceLines).values({ invoiceId: row!.id, kind: 'other', description: 'Earlier work', quantity: 1, unitPriceMinor: row!.subtotalMinor, amountMinor: row!.subtotalMinor })
      return row!.id
    }
    for (const [id, start, end, total] of [[k1, '2026-04-01', '2027-03-31', 129_600], [k2, '2026-04-05', '2027-04-04', 64_800], [k5, '2026-03-06', '2027-03-05', 97_200]] as const) {
      await invoice({ contractId: id, source: 'contract_term', billingKey: `term:${id}`, periodStart: start, periodEnd: end, status: 'paid', totalMinor: total, amountPaidMinor: total, issueDate: '2027-01-02', dueDate: '2027-01-16' })
    }
    await invoice({ contractId: k3, source: 'contract_month', billingKey: `month:${k3}:2026-12-15`, status: 'paid', totalMinor: 10_800, amountPaidMinor: 10_800, issueDate: '2027-01-02', dueDate: '2027-01-16' })
    // Four open invoices, 7, 14, 37 and 5 days past due on BOOK_TODAY.
    const i1 = await invoice({ totalMinor: 10_800, issueDate: '2027-02-17', dueDate: '2027-03-03' })
    const i2 = await invoice({ totalMinor: 10_800, issueDate: '2027-02-10', dueDate: '2027-02-24' })
    const i3 = await invoice({ totalMinor: 10_800, issueDate: '2027-01-18', dueDate: '2027-02-01' })
    const i4 = await invoice({ totalMinor: 10_800, issueDate: '2027-02-19', dueDate: '2027-03-05' })
    await tx.insert(schema.invoiceCounters).values({ companyId, year: 2027, lastSeq: seq })
    // K4's visits: two done (to bill), one to come.
    for (const [on, status] of [['2027-02-20', 'done'], ['2027-03-05', 'done'], ['2027-04-20', 'scheduled']] as const) {
      await tx.insert(schema.visits).values({ companyId, contractId: k4, customerId: cust!.id, siteId: site!.id, visitType: 'routine', scheduledOn: on, startsAt: new Date(`${on}T14:00:00Z`), durationMinutes: 60, status })
    }
    return { companyId, ownerEmail, customerEmail, customerLoginEmail, contracts: { k1, k2, k3, k4, k5 }, overdue: { i1, i2, i3, i4 } }
  })
}

/** Runs `npm run task:billing` for one company as a separate process (as an operator would). */
export function runBillingTask(args: { companyId: string, today?: string, crashAfter?: number, invoiceBatch?: number }) {
  const argv = ['scripts/task-billing.ts', '--company', args.companyId, '--today', args.today ?? BOOK_TODAY]
  if (args.crashAfter) argv.push('--crash-after', String(args.crashAfter))
  if (args.invoiceBatch) argv.push('--invoice-batch', String(args.invoiceBatch))
  return new Promise<{ code: number | null, signal: NodeJS.Signals | null, result: any }>((done, fail) => {
    const child = spawn(resolve(root, 'node_modules/.bin/tsx'), argv, {
      cwd: root,
      env: { ...process.env, DATABASE_URL: inject('databaseUrl'), ...inject('paymentsEnv'), RILLBOOK_PUBLIC_URL: inject('baseUrl') },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let out = ''
    let err = ''
    child.stdout.on('data', (d) => { out += d })
    child.stderr.on('data', (d) => { err += d })
    child.on('error', fail)
    child.on('exit', (code, signal) => {
      let result: any = null
      try {
        result = JSON.parse(out.trim().split('\n').at(-1) ?? '')
      }
      catch {}
      // tsx runs the script in a child node process: a SIGKILL there comes back as exit code 137.
      const killed = signal === 'SIGKILL' || code === 137
      if (code !== 0 && !killed) return fail(new Error(`the billing task failed (${code}): ${err}`))
      done({ code, signal: killed ? 'SIGKILL' : signal, result })
    })
  })
}
