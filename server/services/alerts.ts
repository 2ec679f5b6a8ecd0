import { and, asc, count, desc, eq, gt, isNull, lt, ne, sql, type SQL } from 'drizzle-orm'
import { addDays, localToday } from '../../shared/utils/company-time'
import { topUpLitresToMm } from '../../shared/utils/water-chemistry'
import type { UnitSystem } from '../../shared/utils/water/format'
import { alerts, companies, contracts, customers, doses, readings, taskWatermarks, visits, waterFeatures } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { isLockTimeout, useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { notifyFeatureAlerts } from './alert-mail'
import { applyAlertSteps } from './alert-batch'
import { ALERT_RULES, readingSteps, type Finding, type PreviousReading, type ScannedReading, type Severity, type Step } from './alert-findings'
import { enqueueMail } from './mail'
import { ownerEmails } from './recipients'
import { escapeHtml } from '../utils/html'

const WATERMARK = 'alerts:scan'
/** The advisory key every statement writing readings holds shared until commit (migration 0027). */
const READING_WRITERS = 'alerts:scan:readings'
/** How long the scan waits for the readings being written right now before it leaves them to the next run. */
const WRITERS_WAIT = '5s'
/** Readings per batch of features: bounds the scan's memory however much history is new. */
const BATCH_READINGS = 20_000
export { ALERT_RULES }

/**
 * The alert scan. Runs once across any number of app instances (a PostgreSQL advisory lock held
 * for the transaction; a second concurrent run returns `skipped`). Readings are read past a stored
 * watermark, so the cost follows new data; the time-based checks (overdue visits, equipment,
 * renewals) use indexed queries. Alerts and their e-mails are written in the same transaction.
 */
export async function runAlertScan(opts: { now?: Date } = {}) {
  const now = opts.now ?? new Date()
  const bound = await committedReadingsBound()
  if (bound === null) return { skipped: true as const }
  return useDb().transaction(async (tx) => {
    const { rows: [lock] } = await tx.execute<{ ok: boolean }>(sql`select pg_try_advisory_xact_lock(hashtext(${WATERMARK})) as ok`)
    if (!lock?.ok) return { skipped: true as const }
    await tx.insert(taskWatermarks).values({ name: WATERMARK, lastSeq: 0 }).onConflictDoNothing()
    const [mark] = await tx.select().from(taskWatermarks).where(eq(taskWatermarks.name, WATERMARK)).for('update')
    const started = performance.now()
    const notifyIds: string[] = []
    const scanned = await scanReadings(tx, mark!.lastSeq, Math.max(mark!.lastSeq, bound), now)
    notifyIds.push(...scanned.notify)
    // Time-based findings are raised together at the end, like a batch of readings.
    const timeSteps: Array<Step & { companyId: string }> = []
    const raise = (f: Finding) => timeSteps.push({ subjectKey: f.subjectKey, companyId: f.companyId, finding: f })

    // Time-based checks, per company in its own time zone.
    const companyRows = await tx.select({ id: companies.id, tz: companies.timeZone }).from(companies)
    for (const c of companyRows) {
      const today = localToday(c.tz, now)
      const overdue = await tx.select({ id: visits.id, scheduledOn: visits.scheduledOn, customerName: customers.name }).from(visits).innerJoin(customers, eq(customers.id, visits.customerId))
        .where(and(eq(visits.companyId, c.id), eq(visits.status, 'scheduled'), lt(visits.scheduledOn, today), gt(visits.scheduledOn, addDays(today, -ALERT_RULES.overdueLookbackDays))))
      for (const v of overdue) raise({ companyId: c.id, subjectKey: `visit:${v.id}:overdue`, condition: 'visit.overdue', severity: 'watch', title: `Visit to ${v.customerName} on ${v.scheduledOn} is not done`, visitId: v.id })
      const openOverdue = await tx.select({ id: alerts.id, visitId: alerts.visitId }).from(alerts).where(and(eq(alerts.companyId, c.id), eq(alerts.condition, 'visit.overdue'), ne(alerts.status, 'resolved')))
      const stillOverdue = new Set(overdue.map(v => v.id))
      for (const a of openOverdue) if (a.visitId && !stillOverdue.has(a.visitId)) await tx.update(alerts).set({ status: 'resolved', closedAt: now, note: 'The visit was done, moved or cancelled' }).where(eq(alerts.id, a.id))

      const uvDue = addDays(today, -Math.round(ALERT_RULES.uvBulbMonths * 30.44))
      const uv = await tx.select({ id: waterFeatures.id, name: waterFeatures.name, bulb: sql<string>`${waterFeatures.equipment} -> 'uvClarifier' ->> 'bulbInstalledOn'` })
        .from(waterFeatures).where(and(eq(waterFeatures.companyId, c.id), isNull(waterFeatures.archivedAt), sql`(${waterFeatures.equipment} -> 'uvClarifier' ->> 'bulbInstalledOn') < ${uvDue}`))
      for (const f of uv) raise({ companyId: c.id, subjectKey: `equipment:${f.id}:uv_bulb`, condition: 'equipment.uv_bulb', severity: 'watch', title: `UV bulb of ${f.name} fitted ${f.bulb}: due for replacement (about yearly, common practice)`, featureId: f.id })

      const ending = await tx.select({ id: contracts.id, termEnd: contracts.termEnd, customerName: customers.name }).from(contracts).innerJoin(customers, eq(customers.id, contracts.customerId))
        .where(and(eq(contracts.companyId, c.id), eq(contracts.status, 'active'), eq(contracts.autoRenew, false), sql`${contracts.termEnd} <= ${addDays(today, ALERT_RULES.renewalWindowDays)}`,
          sql`not exists (select 1 from ${contracts} n where n.previous_contract_id = ${contracts.id})`))
      for (const k of ending) raise({ companyId: c.id, subjectKey: `contract:${k.id}:renewal`, condition: 'contract.renewal', severity: 'watch', title: `${k.customerName}'s contract ends ${k.termEnd} and does not renew by itself: ask them`, contractId: k.id })
    }

    notifyIds.push(...await applyAlertSteps(tx, timeSteps, now))

    // E-mail for `act`: one message per person per feature per scan, naming every result that needs
    // action. Only what is still open and still `act` at the end of the run (an old episode that a
    // later reading closed or calmed is history, not news).
    const current = notifyIds.length
      ? await tx.select().from(alerts).where(and(sql`${alerts.id} in (select jsonb_array_elements_text(${JSON.stringify([...new Set(notifyIds)])}::jsonb)::uuid)`, ne(alerts.status, 'resolved'), eq(alerts.severity, 'act'))).orderBy(asc(alerts.firstSeenAt), asc(alerts.subjectKey))
      : []
    const byFeature = new Map<string, typeof current>()
    for (const a of current) (byFeature.get(a.featureId ?? a.id) ?? byFeature.set(a.featureId ?? a.id, []).get(a.featureId ?? a.id)!).push(a)
    for (const group of byFeature.values()) await notifyFeatureAlerts(tx, group)
    await queueWatchDigests(tx, now)

    await tx.update(taskWatermarks).set({ lastSeq: scanned.endSeq, lastRunAt: now }).where(eq(taskWatermarks.name, WATERMARK))
    return { skipped: false as const, readingsScanned: scanned.count, actNotified: current.length, watermark: scanned.endSeq, scanMs: Math.round(performance.now() - started) }
  })
}

/**
 * The highest reading seq at or below which nothing can still appear: every transaction writing
 * readings holds a shared lock from its first write until it commits, so taking that lock
 * exclusively for a moment waits for them, and whoever writes next draws a higher seq. Null when
 * writers kept it longer than WRITERS_WAIT (the next run reads what they wrote).
 */
async function committedReadingsBound(): Promise<number | null> {
  try {
    return await useDb().transaction(async (tx) => {
      await tx.execute(sql`select set_config('lock_timeout', ${WRITERS_WAIT}, true)`)
      await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${READING_WRITERS}))`)
      // A statement of its own: read committed takes its snapshot after the lock is held.
      const { rows: [top] } = await tx.execute<{ end_seq: string }>(sql`select coalesce(max(seq), 0)::text as end_seq from ${readings}`)
      return Number(top!.end_seq)
    })
  }
  catch (err) {
    if (isLockTimeout(err)) return null
    throw err
  }
}

/**
 * Every reading past the watermark up to `endSeq` (see committedReadingsBound), in one run, in batches of whole features (at most about
 * BATCH_READINGS readings each, so memory stays bounded): each feature's new readings are applied
 * in the order they were taken (then arrival), so a reading that arrives late lands in its place,
 * and only the feature's newest new reading clears. Everything stays in the scan's one
 * transaction: batches are by feature, not by arrival, so there is no watermark to move between
 * them, and a failure leaves nothing half-done.
 */
async function scanReadings(tx: Tx, afterSeq: number, endSeq: number, now: Date) {
  if (endSeq === afterSeq) return { endSeq, count: 0, notify: [] as string[] }
  // Many short queries over a large table: compiling each one (JIT) costs more than it saves.
  await tx.execute(sql`set local jit = off`)
  const { rows: perFeature } = await tx.execute<{ feature_id: string, n: number }>(sql`
    select feature_id, count(*)::int as n from ${readings} where seq > ${afterSeq} and seq <= ${endSeq} group by feature_id order by feature_id`)
  const unitsOf = new Map((await tx.select({ id: companies.id, unitSystem: companies.unitSystem }).from(companies)).map(c => [c.id, c.unitSystem as UnitSystem]))
  const notify: string[] = []
  let count = 0
  for (let i = 0; i < perFeature.length;) {
    const chunk: string[] = []
    for (let n = 0; i < perFeature.length && (n === 0 || n + perFeature[i]!.n <= BATCH_READINGS); i++) {
      chunk.push(perFeature[i]!.feature_id)
      n += perFeature[i]!.n
    }
    const batch = await readingsOfFeatures(tx, { first: chunk[0]!, last: chunk.at(-1)! }, afterSeq, endSeq)
    count += batch.length
    const addedMm = await topUpsBetween(tx, batch)
    const steps: Array<Step & { companyId: string }> = []
    batch.forEach((r, j) => {
      const isLatest = batch[j + 1]?.featureId !== r.featureId
      for (const s of readingSteps(r, { prev: r.prev, isLatest, units: unitsOf.get(r.companyId) ?? 'metric', addedMm: addedMm.get(r.id) ?? 0 })) steps.push({ ...s, companyId: r.companyId })
    })
    notify.push(...await applyAlertSteps(tx, steps, now))
  }
  return { endSeq, count, notify }
}

type BatchReading = ScannedReading & { prev: PreviousReading | null }

/**
 * The new readings of a range of features (by id, so the planner reads the range from the
 * (feature, taken_at) index), ordered by feature then time taken, each with its previous reading.
 */
async function readingsOfFeatures(tx: Tx, features: { first: string, last: string }, afterSeq: number, endSeq: number): Promise<BatchReading[]> {
  const { rows } = await tx.execute<{ id: string, company_id: string, feature_id: string, visit_id: string | null, taken_at: string | Date, ph: number | null, temperature_c: number | null, kh_mg_l: number | null, water_level_mm: number | null, evaluation: ScannedReading['evaluation'], p_taken_at: string | Date | null, p_ph: number | null, p_temperature_c: number | null, p_kh_mg_l: number | null, p_water_level_mm: number | null }>(sql`
    select r.id, r.company_id, r.feature_id, r.visit_id, r.taken_at, r.ph, r.temperature_c, r.kh_mg_l, r.water_level_mm, r.evaluation,
      p.taken_at as p_taken_at, p.ph as p_ph, p.temperature_c as p_temperature_c, p.kh_mg_l as p_kh_mg_l, p.water_level_mm as p_water_level_mm
    from ${readings} r left join lateral (
      select q.ph, q.temperature_c, q.kh_mg_l, q.water_level_mm, q.taken_at from ${readings} q
      where q.feature_id = r.feature_id and q.taken_at < r.taken_at and q.seq <= ${endSeq} order by q.taken_at desc limit 1
    ) p on true
    where r.seq > ${afterSeq} and r.seq <= ${endSeq} and r.feature_id between ${features.first} and ${features.last}
    order by r.feature_id, r.taken_at, r.seq`)
  return rows.map(r => ({
    id: r.id, companyId: r.company_id, featureId: r.feature_id, visitId: r.visit_id, takenAt: new Date(r.taken_at), pH: r.ph, temperatureC: r.temperature_c, khMgL: r.kh_mg_l, waterLevelMm: r.water_level_mm, evaluation: r.evaluation,
    prev: r.p_taken_at == null ? null : { takenAt: new Date(r.p_taken_at), pH: r.p_ph, temperatureC: r.p_temperature_c, khMgL: r.p_kh_mg_l, waterLevelMm: r.p_water_level_mm },
  }))
}

/** Top-up water (mm of level) between each newest level reading and its previous one: one query for the batch. */
async function topUpsBetween(tx: Tx, batch: BatchReading[]) {
  const out = new Map<string, number>()
  const latest = batch.filter((r, j) => batch[j + 1]?.featureId !== r.featureId && r.waterLevelMm != null && r.prev?.waterLevelMm != null)
  if (!latest.length) return out
  const ids = [...new Set(latest.map(r => r.featureId))]
  const inIds = sql`(select jsonb_array_elements_text(${JSON.stringify(ids)}::jsonb)::uuid)`
  const areas = new Map((await tx.select({ id: waterFeatures.id, area: waterFeatures.surfaceAreaM2 }).from(waterFeatures).where(sql`${waterFeatures.id} in ${inIds}`)).map(f => [f.id, f.area]))
  const topUps = await tx.select({ featureId: doses.featureId, amount: doses.amount, dosedAt: doses.dosedAt }).from(doses).where(and(sql`${doses.featureId} in ${inIds}`, eq(doses.isTopUp, true)))
  for (const r of latest) {
    const added = topUps.filter(t => t.featureId === r.featureId && t.dosedAt > r.prev!.takenAt && t.dosedAt < r.takenAt)
    out.set(r.id, added.reduce((s, t) => s + topUpLitresToMm(t.amount, areas.get(r.featureId)!), 0))
  }
  return out
}


/** One digest a day per company of its open `watch` alerts, to the owners. */
async function queueWatchDigests(tx: Tx, now: Date) {
  const rows = await tx.select({ companyId: alerts.companyId, title: alerts.title, tz: companies.timeZone }).from(alerts).innerJoin(companies, eq(companies.id, alerts.companyId))
    .where(and(eq(alerts.status, 'open'), eq(alerts.severity, 'watch'))).orderBy(asc(alerts.firstSeenAt)).limit(5000)
  const byCompany = new Map<string, { tz: string, titles: string[] }>()
  for (const r of rows) (byCompany.get(r.companyId) ?? byCompany.set(r.companyId, { tz: r.tz, titles: [] }).get(r.companyId)!).titles.push(r.title)
  for (const [companyId, { tz, titles }] of byCompany) {
    const owners = await ownerEmails(tx, companyId)
    const day = localToday(tz, now)
    await enqueueMail(tx, {
      companyId, dedupeKey: `digest:${companyId}:${day}`, to: owners, subject: `${titles.length} things to watch — ${day}`,
      text: titles.map(t => `- ${t}`).join('\n'), html: `<ul>${titles.map(t => `<li>${escapeHtml(t)}</li>`).join('')}</ul>`,
    })
  }
}


export async function listAlerts(actor: SessionUser, q: { page: number, pageSize: number, status?: 'open' | 'acknowledged' | 'resolved' | 'active', severity?: Severity, featureId?: string }) {
  const db = useDb()
  const where: SQL[] = [eq(alerts.companyId, actor.companyId)]
  if (q.status === 'active') where.push(ne(alerts.status, 'resolved'))
  else if (q.status) where.push(eq(alerts.status, q.status))
  if (q.severity) where.push(eq(alerts.severity, q.severity))
  if (q.featureId) where.push(eq(alerts.featureId, q.featureId))
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select({
      id: alerts.id, condition: alerts.condition, severity: alerts.severity, status: alerts.status, title: alerts.title, value: alerts.value,
      featureId: alerts.featureId, featureName: waterFeatures.name, customerName: customers.name, visitId: alerts.visitId, contractId: alerts.contractId,
      firstSeenAt: alerts.firstSeenAt, lastSeenAt: alerts.lastSeenAt, closedAt: alerts.closedAt, note: alerts.note, retestVisitId: alerts.retestVisitId,
    }).from(alerts).leftJoin(waterFeatures, eq(waterFeatures.id, alerts.featureId)).leftJoin(customers, eq(customers.id, waterFeatures.customerId))
      .where(cond).orderBy(desc(sql`${alerts.severity} = 'act'`), desc(alerts.lastSeenAt)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(alerts).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

export async function openAlertCounts(actor: SessionUser) {
  const rows = await useDb().select({ severity: alerts.severity, n: count() }).from(alerts)
    .where(and(eq(alerts.companyId, actor.companyId), ne(alerts.status, 'resolved'))).groupBy(alerts.severity)
  const features = await useDb().selectDistinct({ featureId: alerts.featureId }).from(alerts)
    .where(and(eq(alerts.companyId, actor.companyId), ne(alerts.status, 'resolved'), sql`${alerts.featureId} is not null`)).limit(12)
  return { act: rows.find(r => r.severity === 'act')?.n ?? 0, watch: rows.find(r => r.severity === 'watch')?.n ?? 0, featureIds: features.map(f => f.featureId!) }
}

export async function closeAlert(actor: SessionUser, id: string, input: { status: 'acknowledged' | 'resolved', note?: string }, ip: string) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(alerts).set({ status: input.status, ...(input.note !== undefined && { note: input.note }), ...(input.status === 'resolved' && { closedAt: new Date(), closedBy: actor.id }) })
      .where(and(eq(alerts.id, id), eq(alerts.companyId, actor.companyId), ne(alerts.status, 'resolved'))).returning()
    if (!row) throw httpError(404, 'No such open alert')
    await recordAudit(tx, { action: `alert.${input.status}`, companyId: actor.companyId, actorUserId: actor.id, subjectType: 'alert', subjectId: id, ip, detail: { note: input.note } })
    return row
  })
}
