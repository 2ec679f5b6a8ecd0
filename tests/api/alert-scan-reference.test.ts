import { spawn } from 'node:child_process'
import { randomUUID } from 'node:crypto'
import { resolve } from 'node:path'
import { and, eq, like, sql } from 'drizzle-orm'
import { afterAll, describe, expect, inject, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { readingSteps, type ScannedReading, type Step } from '../../server/services/alert-findings'
import { closeTestDb, testDb } from '../helpers/billing-book'

// The set-based alert scan (batches of features, multi-row writes) against a reference written
// here: one reading at a time, in the order taken, against a plain list of alerts. Both use the
// same findings of a reading (`readingSteps`); what is checked is how the scan orders, batches and
// writes them: the same subject keys, severities, open/resolved states, titles and "act" e-mails,
// with readings that arrive out of order, later readings that clear, and two runs at once.

afterAll(closeTestDb)
const root = resolve(import.meta.dirname, '../..')
const T0 = Date.parse('2027-05-10T08:00:00Z')
const at = (h: number) => new Date(T0 + h * 3600_000)

function runScan() {
  return new Promise<{ skipped: boolean, readingsScanned?: number }>((done, fail) => {
    const child = spawn(resolve(root, 'node_modules/.bin/tsx'), ['scripts/task-alerts.ts'], { cwd: root, env: { ...process.env, DATABASE_URL: inject('databaseUrl'), RILLBOOK_PUBLIC_URL: inject('baseUrl') }, stdio: ['ignore', 'pipe', 'pipe'] })
    let out = ''
    let err = ''
    child.stdout.on('data', (d) => { out += d })
    child.stderr.on('data', (d) => { err += d })
    child.on('error', fail)
    child.on('exit', code => (code === 0 ? done(JSON.parse(out.trim().split('\n').at(-1)!)) : fail(new Error(`alert scan failed (${code}): ${err}`))))
  })
}

type Status = 'ok' | 'watch' | 'act'
const result = (parameter: string, value: number, status: Status) => ({ parameter, value, status, limit: status === 'ok' ? null : 1, reason: `${parameter} ${value} is ${status === 'ok' ? 'fine' : 'out of range'} (${status})` })
interface Test { featureId: string, takenAt: Date, pH?: number, results: ReturnType<typeof result>[] }

/** The reference: one reading at a time, a list of alerts, nothing clever. */
class ReferenceScan {
  alerts: Array<{ subjectKey: string, severity: string, status: 'open' | 'resolved', title: string, value: number | null }> = []
  mails: string[][] = []
  seen: ScannedReading[] = []
  run(batch: ScannedReading[]) {
    // A reading saved again replaces what was seen of it.
    this.seen = this.seen.filter(q => !batch.some(r => r.id === q.id))
    const notify: typeof this.alerts = []
    const inOrder = [...batch].sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime())
    for (const r of inOrder) {
      const earlier = [...this.seen, ...batch].filter(q => q.featureId === r.featureId && q.takenAt < r.takenAt).sort((a, b) => b.takenAt.getTime() - a.takenAt.getTime())[0]
      const newest = inOrder.filter(q => q.featureId === r.featureId).at(-1) === r
      const prev = earlier ? { pH: earlier.pH, temperatureC: earlier.temperatureC, khMgL: earlier.khMgL, waterLevelMm: earlier.waterLevelMm, takenAt: earlier.takenAt } : null
      for (const s of readingSteps(r, { prev, isLatest: newest, units: 'metric', addedMm: 0 })) this.apply(s, notify)
    }
    this.seen.push(...batch)
    const byFeature = new Map<string, string[]>()
    for (const a of new Set(notify)) {
      if (a.status !== 'open' || a.severity !== 'act') continue
      const feature = a.subjectKey.split(':')[1]!
      byFeature.set(feature, [...(byFeature.get(feature) ?? []), a.title])
    }
    this.mails.push(...[...byFeature.values()].map(t => t.sort()))
  }

  apply(s: Step, notify: typeof this.alerts) {
    const open = this.alerts.find(a => a.subjectKey === s.subjectKey && a.status === 'open')
    if (!s.finding) {
      if (open) open.status = 'resolved'
      return
    }
    if (open) {
      if (open.severity === 'watch' && s.finding.severity === 'act') notify.push(open)
      Object.assign(open, { severity: s.finding.severity, title: s.finding.title, value: s.finding.value ?? null })
      return
    }
    const created = { subjectKey: s.subjectKey, severity: s.finding.severity, status: 'open' as const, title: s.finding.title, value: s.finding.value ?? null }
    this.alerts.push(created)
    if (created.severity === 'act') notify.push(created)
  }
}

async function book() {
  const db = testDb()
  const tag = Date.now().toString(36)
  const [company] = await db.insert(schema.companies).values({ name: `Scan Reference ${tag}`, currency: 'USD', unitSystem: 'metric', timeZone: 'UTC' }).returning()
  const companyId = company!.id
  await db.insert(schema.users).values({ companyId, email: `owner-${tag}@scanref.example`, name: 'Scan Owner', role: 'owner', passwordHash: 'x' })
  const [cust] = await db.insert(schema.customers).values({ companyId, name: `Scan Household ${tag}`, billingLine1: '3 Sedge Row', billingCity: 'Fenbrook' }).returning()
  await db.insert(schema.customerContacts).values({ customerId: cust!.id, name: 'Scan Contact', email: `contact-${tag}@household.example`, getsAlerts: true })
  const [site] = await db.insert(schema.sites).values({ companyId, customerId: cust!.id, name: 'Front garden', line1: '3 Sedge Row', city: 'Fenbrook' }).returning()
  const feature = async (name: string) => (await db.insert(schema.waterFeatures).values({
    companyId, customerId: cust!.id, siteId: site!.id, name, kind: 'water_garden',
    shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.6 }, surfaceAreaM2: 6, computedVolumeL: 3600, equipment: {} as never,
  }).returning())[0]!.id
  return { companyId, a: await feature('Koi pond'), b: await feature('Rill') }
}

const readingRows = (companyId: string, tests: Array<Test & { id?: string }>) =>
  tests.map(t => ({ id: t.id ?? randomUUID(), companyId, featureId: t.featureId, takenAt: t.takenAt, pH: t.pH ?? null, evaluation: t.results as never, overall: 'ok' as const, source: 'technician' as const }))
const asScanned = (rows: ReturnType<typeof readingRows>): ScannedReading[] =>
  rows.map(r => ({ id: r.id, companyId: r.companyId, featureId: r.featureId, visitId: null, takenAt: r.takenAt, pH: r.pH, temperatureC: null, khMgL: null, waterLevelMm: null, evaluation: r.evaluation }))

/** Saves tests in the order given (their arrival order), in one statement, and returns them as the scan reads them. */
async function arrive(companyId: string, tests: Test[], db: Pick<ReturnType<typeof testDb>, 'insert'> = testDb()): Promise<ScannedReading[]> {
  const rows = readingRows(companyId, tests)
  await db.insert(schema.readings).values(rows)
  return asScanned(rows)
}

/** Saves a test again under its id, as a resubmitted visit record does (insert, or update on conflict). */
async function saveAgain(companyId: string, test: Test & { id: string }): Promise<ScannedReading[]> {
  const rows = readingRows(companyId, [test])
  const { id: _id, ...set } = rows[0]!
  await testDb().insert(schema.readings).values(rows).onConflictDoUpdate({ target: schema.readings.id, set })
  return asScanned(rows)
}

async function scanState(companyId: string) {
  const db = testDb()
  const rows = await db.select().from(schema.alerts).where(eq(schema.alerts.companyId, companyId))
  const alerts = rows.map(a => ({ subjectKey: a.subjectKey, severity: a.severity, status: a.status === 'resolved' ? 'resolved' : 'open', title: a.title, value: a.value }))
  const mail = await db.select({ text: schema.outbox.text }).from(schema.outbox).where(and(eq(schema.outbox.companyId, companyId), like(schema.outbox.dedupeKey, 'alerts:%:owner')))
  const mails = mail.map(m => m.text.split('\n').filter(l => l.startsWith('- ')).map(l => l.slice(2)).sort())
  return { alerts, mails }
}
const sorted = <T>(xs: T[]) => [...xs].sort((x, y) => JSON.stringify(x).localeCompare(JSON.stringify(y)))

describe('the set-based alert scan against a reading-by-reading reference', () => {
  it('raises, updates, clears and e-mails exactly as the reference over three runs, out-of-order arrivals and two runs at once', async () => {
    const { companyId, a, b } = await book()
    const ref = new ReferenceScan()
    const check = async () => {
      const got = await scanState(companyId)
      expect(sorted(got.alerts)).toEqual(sorted(ref.alerts))
      expect(sorted(got.mails)).toEqual(sorted(ref.mails))
    }

    // Run 1. A: a bad pH taken first arrives after the good one taken later → raised and closed.
    // B: ammonia act then watch (the newer decides: watch); nitrite watch then act (one e-mail).
    const run1 = await arrive(companyId, [
      { featureId: a, takenAt: at(2), pH: 7.2, results: [result('pH', 7.2, 'ok')] },
      { featureId: a, takenAt: at(1), pH: 6.0, results: [result('pH', 6.0, 'act')] },
      { featureId: b, takenAt: at(1), results: [result('totalAmmoniaMgL', 2, 'act'), result('nitriteMgL', 0.3, 'watch')] },
      { featureId: b, takenAt: at(2), results: [result('totalAmmoniaMgL', 0.6, 'watch'), result('nitriteMgL', 0.9, 'act')] },
    ])
    expect((await runScan()).skipped).toBe(false)
    ref.run(run1)
    await check()
    expect(ref.alerts.filter(x => x.subjectKey.endsWith(':pH'))).toMatchObject([{ status: 'resolved', severity: 'act' }])

    // Run 2. A: a new act pH (a new alert, a pH fall of 1.3 against the 7.2 before it) and an old
    // test from before everything, arriving late, good: it is not the newest, so it clears nothing.
    // B: ammonia back in range (closed); nitrite act again (already act: no second e-mail).
    const run2 = await arrive(companyId, [
      { featureId: a, takenAt: at(5), pH: 5.9, results: [result('pH', 5.9, 'act')] },
      { featureId: a, takenAt: at(-10), pH: 7.4, results: [result('pH', 7.4, 'ok')] },
      { featureId: b, takenAt: at(5), results: [result('totalAmmoniaMgL', 0.1, 'ok'), result('nitriteMgL', 1.2, 'act')] },
    ])
    await runScan()
    ref.run(run2)
    await check()
    expect(ref.alerts.filter(x => x.subjectKey === `trend:${a}:ph_drop`)).toMatchObject([{ status: 'open', severity: 'act' }])

    // A run while another holds the scan's lock skips and changes nothing.
    const pool = testDb()
    const held = pool.transaction(async (tx) => {
      await tx.execute(sql`select pg_advisory_xact_lock(hashtext('alerts:scan'))`)
      const r = await runScan()
      expect(r.skipped).toBe(true)
    })
    await held

    // Run 3, started twice at once: A's pH good again, steady → the pH and pH-fall alerts close.
    const run3 = await arrive(companyId, [{ featureId: a, takenAt: at(8), pH: 7.3, results: [result('pH', 7.3, 'ok')] }])
    const both = await Promise.all([runScan(), runScan()])
    expect(both.filter(r => !r.skipped).length).toBeGreaterThanOrEqual(1)
    ref.run(run3)
    await check()
    expect(ref.alerts.filter(x => x.status === 'open').map(x => x.subjectKey).sort()).toEqual([`reading:${b}:nitriteMgL`])
  }, 120_000)

  it('reads a test whose transaction commits after a later one, and a test saved again with other values', async () => {
    const { companyId, a, b } = await book()
    const ref = new ReferenceScan()
    const check = async () => {
      const got = await scanState(companyId)
      expect(sorted(got.alerts)).toEqual(sorted(ref.alerts))
      expect(sorted(got.mails)).toEqual(sorted(ref.mails))
    }
    const pool = testDb()
    const scanWaits = async () => (await pool.execute<{ n: number }>(sql`select count(*)::int as n from pg_locks where locktype = 'advisory' and not granted`)).rows[0]!.n > 0

    // A's test is written in a transaction that stays open; B's, written after it (a higher seq),
    // commits first. The scan starts while A's is still open; A's commits once the scan waits for it
    // (or, if it never waits, once it has finished).
    let commitA!: () => void
    const gate = new Promise<void>((r) => { commitA = r })
    let lateA!: ScannedReading[]
    const written = new Promise<void>((r) => {
      void pool.transaction(async (tx) => {
        lateA = await arrive(companyId, [{ featureId: a, takenAt: at(1), pH: 6.0, results: [result('pH', 6.0, 'act')] }], tx)
        r()
        await gate
      })
    })
    await written
    const earlyB = await arrive(companyId, [{ featureId: b, takenAt: at(1), results: [result('nitriteMgL', 0.3, 'watch')] }])
    let finished = false
    const scan1 = runScan().finally(() => { finished = true })
    while (!finished && !(await scanWaits())) await new Promise(r => setTimeout(r, 50))
    commitA()
    await scan1
    await runScan()
    ref.run([...lateA, ...earlyB])
    await check()
    expect(ref.alerts.map(x => x.subjectKey).sort()).toEqual([`reading:${a}:pH`, `reading:${b}:nitriteMgL`].sort())

    // B's test saved again with nitrite now at the act level: the next scan reads it again.
    const id = earlyB[0]!.id
    const again = await saveAgain(companyId, { id, featureId: b, takenAt: at(1), results: [result('nitriteMgL', 0.9, 'act')] })
    expect((await runScan()).readingsScanned).toBe(1)
    ref.run(again)
    await check()
    expect(ref.alerts.find(x => x.subjectKey === `reading:${b}:nitriteMgL`)).toMatchObject({ severity: 'act', status: 'open' })
    // Saved again unchanged (a resubmission of the same form): nothing new to read.
    await saveAgain(companyId, { id, featureId: b, takenAt: at(1), results: [result('nitriteMgL', 0.9, 'act')] })
    expect((await runScan()).readingsScanned).toBe(0)
    await check()
  }, 120_000)
})
