import { and, asc, count, desc, eq, gt, inArray, isNull, lt, ne, sql, type SQL } from 'drizzle-orm'
import { addDays, localToday } from '../../shared/utils/company-time'
import { dailyWaterLossMm, EVAPORATION_ALLOWANCE_MM_PER_DAY, topUpLitresToMm, waterLossStatus } from '../../shared/utils/water-chemistry'
import { formatNumber, formatQuantity, toDisplay, unitFor, type UnitSystem } from '../../shared/utils/water/format'
import { formatParameter } from '../../shared/utils/water/parameters'
import { alerts, companies, contracts, customers, doses, readings, taskWatermarks, visits, waterFeatures } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { notifyFeatureAlerts } from './alert-mail'
import { enqueueMail } from './mail'
import { ownerEmails } from './recipients'
import { escapeHtml } from '../utils/html'

const WATERMARK = 'alerts:scan'
/** Rules of thumb (common practice, no source) unless marked. */
export const ALERT_RULES = {
  /** EU Directive 2006/44/EC, Annex I: artificial pH variation within ±0.5 (published). */
  pHDropWatch: 0.5,
  pHDropAct: 1.0,
  temperatureSwingC: 5,
  temperatureSwingHours: 48,
  uvBulbMonths: 12,
  renewalWindowDays: 60,
  overdueLookbackDays: 30,
} as const

type Severity = 'watch' | 'act'
interface Finding { companyId: string, subjectKey: string, condition: string, severity: Severity, title: string, detail?: string, value?: number | null, featureId?: string | null, visitId?: string | null, contractId?: string | null }

/**
 * Opens or updates the one open alert for a subject; returns it when it is new or just became
 * `act`. The severity follows the latest finding, so the title (the finding's words) and the
 * severity always agree: a watch-level result never sits under an "act today" alert.
 */
async function raise(tx: Tx, f: Finding, now: Date) {
  const [existing] = await tx.select().from(alerts).where(and(eq(alerts.companyId, f.companyId), eq(alerts.subjectKey, f.subjectKey), ne(alerts.status, 'resolved'))).limit(1)
  if (existing) {
    const escalated = existing.severity === 'watch' && f.severity === 'act'
    await tx.update(alerts).set({ severity: f.severity, title: f.title, detail: f.detail ?? '', value: f.value ?? null, lastSeenAt: now }).where(eq(alerts.id, existing.id))
    return escalated ? { ...existing, severity: 'act' as const, title: f.title } : null
  }
  const [row] = await tx.insert(alerts).values({ ...f, detail: f.detail ?? '', value: f.value ?? null, firstSeenAt: now, lastSeenAt: now }).returning()
  return row!
}

/** Closes the open alert of a subject by itself (the condition has cleared). */
async function clear(tx: Tx, companyId: string, subjectKey: string, now: Date, note: string) {
  await tx.update(alerts).set({ status: 'resolved', closedAt: now, note })
    .where(and(eq(alerts.companyId, companyId), eq(alerts.subjectKey, subjectKey), ne(alerts.status, 'resolved')))
}

/**
 * The alert scan. Runs once across any number of app instances (a PostgreSQL advisory lock held
 * for the transaction; a second concurrent run returns `skipped`). Readings are read past a stored
 * watermark, so the cost follows new data; the time-based checks (overdue visits, equipment,
 * renewals) use indexed queries. Alerts and their e-mails are written in the same transaction.
 */
export async function runAlertScan(opts: { now?: Date } = {}) {
  const now = opts.now ?? new Date()
  return useDb().transaction(async (tx) => {
    const { rows: [lock] } = await tx.execute<{ ok: boolean }>(sql`select pg_try_advisory_xact_lock(hashtext(${WATERMARK})) as ok`)
    if (!lock?.ok) return { skipped: true as const }
    await tx.insert(taskWatermarks).values({ name: WATERMARK, lastSeq: 0 }).onConflictDoNothing()
    const [mark] = await tx.select().from(taskWatermarks).where(eq(taskWatermarks.name, WATERMARK)).for('update')
    const fresh = await tx.select().from(readings).where(gt(readings.seq, mark!.lastSeq)).orderBy(asc(readings.seq)).limit(50_000)
    // Titles are sentences people read: in each company's units.
    const unitsOf = new Map((await tx.select({ id: companies.id, unitSystem: companies.unitSystem }).from(companies)).map(c => [c.id, c.unitSystem as UnitSystem]))
    const notify: Array<typeof alerts.$inferSelect> = []
    const keep = (a: typeof alerts.$inferSelect | null) => { if (a && a.severity === 'act') notify.push(a) }

    // Latest reading per feature among the new ones decides the reading alerts (older ones only raise).
    // Each new reading's previous reading of the same feature, in one query (no query per reading).
    const previousOf = new Map<string, { pH: number | null, temperatureC: number | null, khMgL: number | null, waterLevelMm: number | null, takenAt: Date }>()
    if (fresh.length) {
      const { rows } = await tx.execute<{ id: string, ph: number | null, temperature_c: number | null, kh_mg_l: number | null, water_level_mm: number | null, taken_at: Date | string }>(sql`
        select r.id, p.ph, p.temperature_c, p.kh_mg_l, p.water_level_mm, p.taken_at
        from ${readings} r cross join lateral (
          select q.ph, q.temperature_c, q.kh_mg_l, q.water_level_mm, q.taken_at from ${readings} q
          where q.feature_id = r.feature_id and q.taken_at < r.taken_at order by q.taken_at desc limit 1
        ) p
        where r.seq > ${mark!.lastSeq} and r.seq <= ${fresh.at(-1)!.seq}`)
      for (const p of rows) previousOf.set(p.id, { pH: p.ph, temperatureC: p.temperature_c, khMgL: p.kh_mg_l, waterLevelMm: p.water_level_mm, takenAt: new Date(p.taken_at) })
    }
    const latestByFeature = new Map<string, number>()
    for (const r of fresh) latestByFeature.set(r.featureId, Math.max(latestByFeature.get(r.featureId) ?? 0, r.takenAt.getTime()))
    for (const r of fresh) {
      const isLatest = latestByFeature.get(r.featureId) === r.takenAt.getTime()
      for (const p of r.evaluation) {
        const key = `reading:${r.featureId}:${p.parameter}`
        if (p.status === 'ok') {
          if (isLatest) await clear(tx, r.companyId, key, now, 'Back in range at a later reading')
          continue
        }
        keep(await raise(tx, { companyId: r.companyId, subjectKey: key, condition: `reading.${p.parameter}`, severity: p.status, title: p.reason, value: p.value, featureId: r.featureId, visitId: r.visitId }, now))
      }
      // Trends against the feature's previous reading (fetched for all new readings at once, above).
      const prev = previousOf.get(r.id)
      if (!prev) continue
      const f = r.featureId
      const units = unitsOf.get(r.companyId) ?? 'metric'
      if (r.pH != null && prev.pH != null) {
        const drop = prev.pH - r.pH
        if (drop > ALERT_RULES.pHDropWatch) keep(await raise(tx, { companyId: r.companyId, subjectKey: `trend:${f}:ph_drop`, condition: 'trend.ph_drop', severity: drop > ALERT_RULES.pHDropAct ? 'act' : 'watch', title: `pH fell by ${drop.toFixed(1)} since the last test (${prev.pH} → ${r.pH}): check KH and what went in`, value: drop, featureId: f, visitId: r.visitId }, now))
        else if (isLatest) await clear(tx, r.companyId, `trend:${f}:ph_drop`, now, 'pH steady at a later reading')
      }
      const khFloor = r.evaluation.find(e => e.parameter === 'khMgL')
      if (r.khMgL != null && prev.khMgL != null) {
        if (r.khMgL < prev.khMgL && khFloor && khFloor.status !== 'ok') keep(await raise(tx, { companyId: r.companyId, subjectKey: `trend:${f}:kh_falling`, condition: 'trend.kh_falling', severity: khFloor.status, title: `KH is low and falling (${formatParameter('khMgL', prev.khMgL, units, { bare: true })} → ${formatParameter('khMgL', r.khMgL, units)}): pH may crash`, value: r.khMgL, featureId: f, visitId: r.visitId }, now))
        else if (isLatest) await clear(tx, r.companyId, `trend:${f}:kh_falling`, now, 'KH no longer low and falling')
      }
      if (r.temperatureC != null && prev.temperatureC != null && r.takenAt.getTime() - prev.takenAt.getTime() <= ALERT_RULES.temperatureSwingHours * 3600_000) {
        const swing = Math.abs(r.temperatureC - prev.temperatureC)
        // A change of temperature in the reader's degrees: the difference of the two shown values.
        const shownSwing = Math.abs(toDisplay('temperature', r.temperatureC, units) - toDisplay('temperature', prev.temperatureC, units))
        if (swing > ALERT_RULES.temperatureSwingC) keep(await raise(tx, { companyId: r.companyId, subjectKey: `trend:${f}:temperature_swing`, condition: 'trend.temperature_swing', severity: 'watch', title: `Water temperature changed ${formatNumber(shownSwing, 1)} ${unitFor('temperature', units)} within ${Math.round((r.takenAt.getTime() - prev.takenAt.getTime()) / 3600_000)} h: stress for fish`, value: swing, featureId: f }, now))
        else if (isLatest) await clear(tx, r.companyId, `trend:${f}:temperature_swing`, now, 'Temperature steady')
      }
      // Water loss from the level readings, adding back top-ups between them.
      if (r.waterLevelMm != null && prev.waterLevelMm != null && isLatest) {
        const [feature] = await tx.select({ area: waterFeatures.surfaceAreaM2 }).from(waterFeatures).where(eq(waterFeatures.id, f)).limit(1)
        const topUps = await tx.select({ amount: doses.amount }).from(doses).where(and(eq(doses.featureId, f), eq(doses.isTopUp, true), gt(doses.dosedAt, prev.takenAt), lt(doses.dosedAt, r.takenAt)))
        const addedMm = topUps.reduce((s, t) => s + topUpLitresToMm(t.amount, feature!.area), 0)
        const perDay = dailyWaterLossMm([{ at: prev.takenAt, levelMm: prev.waterLevelMm, addedMm }, { at: r.takenAt, levelMm: r.waterLevelMm }])
        const status = perDay == null ? 'ok' : waterLossStatus(perDay)
        if (status !== 'ok') keep(await raise(tx, { companyId: r.companyId, subjectKey: `water_loss:${f}`, condition: 'water_loss', severity: status, title: `Losing ${formatQuantity('level', perDay!, units)} of water a day, more than evaporation (about ${formatQuantity('level', EVAPORATION_ALLOWANCE_MM_PER_DAY, units)}): look for a leak`, value: perDay, featureId: f }, now))
        else await clear(tx, r.companyId, `water_loss:${f}`, now, 'Water loss within the evaporation allowance')
      }
    }

    // Time-based checks, per company in its own time zone.
    const companyRows = await tx.select({ id: companies.id, tz: companies.timeZone }).from(companies)
    for (const c of companyRows) {
      const today = localToday(c.tz, now)
      const overdue = await tx.select({ id: visits.id, scheduledOn: visits.scheduledOn, customerName: customers.name }).from(visits).innerJoin(customers, eq(customers.id, visits.customerId))
        .where(and(eq(visits.companyId, c.id), eq(visits.status, 'scheduled'), lt(visits.scheduledOn, today), gt(visits.scheduledOn, addDays(today, -ALERT_RULES.overdueLookbackDays))))
      for (const v of overdue) keep(await raise(tx, { companyId: c.id, subjectKey: `visit:${v.id}:overdue`, condition: 'visit.overdue', severity: 'watch', title: `Visit to ${v.customerName} on ${v.scheduledOn} is not done`, visitId: v.id }, now))
      const openOverdue = await tx.select({ id: alerts.id, visitId: alerts.visitId }).from(alerts).where(and(eq(alerts.companyId, c.id), eq(alerts.condition, 'visit.overdue'), ne(alerts.status, 'resolved')))
      const stillOverdue = new Set(overdue.map(v => v.id))
      for (const a of openOverdue) if (a.visitId && !stillOverdue.has(a.visitId)) await tx.update(alerts).set({ status: 'resolved', closedAt: now, note: 'The visit was done, moved or cancelled' }).where(eq(alerts.id, a.id))

      const uvDue = addDays(today, -Math.round(ALERT_RULES.uvBulbMonths * 30.44))
      const uv = await tx.select({ id: waterFeatures.id, name: waterFeatures.name, bulb: sql<string>`${waterFeatures.equipment} -> 'uvClarifier' ->> 'bulbInstalledOn'` })
        .from(waterFeatures).where(and(eq(waterFeatures.companyId, c.id), isNull(waterFeatures.archivedAt), sql`(${waterFeatures.equipment} -> 'uvClarifier' ->> 'bulbInstalledOn') < ${uvDue}`))
      for (const f of uv) keep(await raise(tx, { companyId: c.id, subjectKey: `equipment:${f.id}:uv_bulb`, condition: 'equipment.uv_bulb', severity: 'watch', title: `UV bulb of ${f.name} fitted ${f.bulb}: due for replacement (about yearly, common practice)`, featureId: f.id }, now))

      const ending = await tx.select({ id: contracts.id, termEnd: contracts.termEnd, customerName: customers.name }).from(contracts).innerJoin(customers, eq(customers.id, contracts.customerId))
        .where(and(eq(contracts.companyId, c.id), eq(contracts.status, 'active'), eq(contracts.autoRenew, false), sql`${contracts.termEnd} <= ${addDays(today, ALERT_RULES.renewalWindowDays)}`,
          sql`not exists (select 1 from ${contracts} n where n.previous_contract_id = ${contracts.id})`))
      for (const k of ending) keep(await raise(tx, { companyId: c.id, subjectKey: `contract:${k.id}:renewal`, condition: 'contract.renewal', severity: 'watch', title: `${k.customerName}'s contract ends ${k.termEnd} and does not renew by itself: ask them`, contractId: k.id }, now))
    }

    // E-mail for `act`: one message per person per feature per scan, naming every result that needs
    // action. Only what is still open and still `act` at the end of the run (an old episode that a
    // later reading closed or calmed is history, not news).
    const current = notify.length
      ? await tx.select().from(alerts).where(and(inArray(alerts.id, [...new Set(notify.map(a => a.id))]), ne(alerts.status, 'resolved'), eq(alerts.severity, 'act'))).orderBy(asc(alerts.firstSeenAt), asc(alerts.subjectKey))
      : []
    const byFeature = new Map<string, typeof current>()
    for (const a of current) (byFeature.get(a.featureId ?? a.id) ?? byFeature.set(a.featureId ?? a.id, []).get(a.featureId ?? a.id)!).push(a)
    for (const group of byFeature.values()) await notifyFeatureAlerts(tx, group)
    await queueWatchDigests(tx, now)

    const maxSeq = fresh.at(-1)?.seq ?? mark!.lastSeq
    await tx.update(taskWatermarks).set({ lastSeq: maxSeq, lastRunAt: now }).where(eq(taskWatermarks.name, WATERMARK))
    return { skipped: false as const, readingsScanned: fresh.length, actNotified: current.length, watermark: maxSeq }
  })
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
