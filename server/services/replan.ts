// "Plan these weeks again" and the tray of visits the planner could not place. The whole range is
// planned at once (one preview, one token). The preview changes nothing and can report its
// progress as it goes; applying re-reads the visits, refuses (409) when anything changed since the
// preview, plans again (the same input gives the same moves) and writes the moves in one transaction.
import { createHash } from 'node:crypto'
import { and, asc, between, eq, gte, inArray, isNotNull, isNull, lte, sql } from 'drizzle-orm'
import { replanDateRangeSteps, type CurrentPlacement, type PlannerMove, type PlannerProgress, type PlannerSteps, type PlannerVisit } from '../../shared/utils/planner/index'
import { localTimeToInstant } from '../../shared/utils/recurrence'
import type { LocalDate } from '../../shared/utils/company-time'
import { expandVisitSchedule } from '../../shared/utils/visit-windows'
import { templateVisitSchedule } from '../../shared/schemas/visit-schedule'
import { closedDays, companies, contracts, customers, planVisitTemplates, sites, visits } from '../db/schema'
import { dayLoad } from '../../shared/utils/day-load'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { companyBase, planningTechnicians } from './season-planning'

type Range = { from: LocalDate, to: LocalDate }

async function loadReplan(tx: Tx, companyId: string, range: Range) {
  const [company] = await tx.select().from(companies).where(eq(companies.id, companyId)).limit(1)
  const technicians = await planningTechnicians(tx, company!)
  const techIds = new Set(technicians.map(t => t.id))
  const rows = await tx.select({
    id: visits.id, day: visits.scheduledOn, technicianId: visits.technicianId, movedManually: visits.movedManually, durationMinutes: visits.durationMinutes,
    siteId: visits.siteId, customerId: visits.customerId, contractId: visits.contractId, templateId: visits.templateId, generationKey: visits.generationKey,
    unplacedReason: visits.unplacedReason, sequence: visits.sequence, lat: sites.latitude, lon: sites.longitude,
  }).from(visits).innerJoin(sites, eq(sites.id, visits.siteId))
    .where(and(eq(visits.companyId, companyId), eq(visits.status, 'scheduled'), between(visits.scheduledOn, range.from, range.to)))
    .orderBy(asc(visits.scheduledOn), asc(visits.id))
  const closed = (await tx.select({ day: closedDays.day }).from(closedDays).where(and(eq(closedDays.companyId, companyId), gte(closedDays.day, range.from), lte(closedDays.day, range.to)))).map(c => c.day)

  // Each generated visit's window, from its template and its contract's term.
  const contractIds = [...new Set(rows.flatMap(r => (r.contractId ? [r.contractId] : [])))]
  const templateIds = [...new Set(rows.flatMap(r => (r.templateId ? [r.templateId] : [])))]
  const terms = new Map((contractIds.length ? await tx.select({ id: contracts.id, start: contracts.termStart, end: contracts.termEnd }).from(contracts).where(inArray(contracts.id, contractIds)) : []).map(c => [c.id, c]))
  const templates = new Map((templateIds.length ? await tx.select().from(planVisitTemplates).where(inArray(planVisitTemplates.id, templateIds)) : []).map(t => [t.id, t]))
  const windowsOf = new Map<string, Map<string, { earliest: LocalDate, latest: LocalDate }>>()
  const windowFor = (r: typeof rows[number]) => {
    const term = r.contractId ? terms.get(r.contractId) : undefined
    const t = r.templateId ? templates.get(r.templateId) : undefined
    if (!term || !t || !r.generationKey) return null
    const cacheKey = `${term.id}:${t.id}`
    if (!windowsOf.has(cacheKey)) {
      try {
        windowsOf.set(cacheKey, new Map(expandVisitSchedule(templateVisitSchedule(t), term).map(w => [`${t.id}:${w.key}`, w])))
      }
      catch {
        windowsOf.set(cacheKey, new Map())
      }
    }
    const key = r.generationKey.split(':').slice(0, 2).join(':')
    return windowsOf.get(cacheKey)!.get(key) ?? null
  }

  const base = companyBase(company!)
  const plannerVisits: PlannerVisit[] = []
  const current: CurrentPlacement[] = []
  for (const r of rows) {
    if (r.technicianId && !techIds.has(r.technicianId)) continue // with someone the planner does not plan for: left alone
    const w = windowFor(r)
    const inWindow = w && r.day >= w.earliest && r.day <= w.latest
    const locked = r.movedManually || !w ? (r.technicianId ? { day: r.day, technicianId: r.technicianId } : undefined) : undefined
    if (!w && !locked) continue // a visit added by hand with nobody on it: the board's to assign
    plannerVisits.push({
      id: r.id, windowEarliest: inWindow ? w.earliest : r.day, windowLatest: inWindow ? w.latest : r.day, preferred: r.day,
      durationMinutes: Math.max(1, r.durationMinutes), siteId: r.siteId, customerId: r.customerId,
      lat: r.lat ?? base.lat, lon: r.lon ?? base.lon, ...(locked && { locked }),
    })
    if (!locked && r.technicianId) current.push({ visitId: r.id, day: r.day, technicianId: r.technicianId })
  }
  const token = createHash('sha256').update(JSON.stringify([range.from, range.to, closed, technicians.map(t => [t.id, t.capacityMinutes, t.workingDays, t.daysOff ?? [], t.home]), rows.map(r => [r.id, r.day, r.technicianId, r.sequence, r.unplacedReason])])).digest('hex').slice(0, 40)
  return { company: company!, technicians, closed, plannerVisits, current, token }
}

/** One technician-day's minutes (visits and driving) before and after the preview's moves. */
export interface ReplanDayLoad { day: LocalDate, technicianId: string, capacityMinutes: number, beforeMinutes: number, afterMinutes: number }

/** What the page is told while a preview is worked out. */
export type ReplanProgress = { stage: 'reading', done: 0, total: 0 } | PlannerProgress

/**
 * Drives a planner generator to its end, giving the event loop a turn between steps so other
 * requests run and `onProgress` output (a streamed answer) reaches the page.
 */
async function runStepsAsync<T>(steps: PlannerSteps<T>, onProgress?: (p: PlannerProgress) => void): Promise<T> {
  for (;;) {
    const r = steps.next()
    if (r.done) return r.value
    onProgress?.(r.value)
    await new Promise(setImmediate)
  }
}

async function preview(state: Awaited<ReturnType<typeof loadReplan>>, range: Range, onProgress?: (p: PlannerProgress) => void) {
  if (!state.technicians.length) return { moves: [] as Array<PlannerMove & { why: string }>, days: [], loads: [] as ReplanDayLoad[] }
  const steps = replanDateRangeSteps({ visits: state.plannerVisits, technicians: state.technicians, closedDays: state.closed }, state.current, range)
  const p = await runStepsAsync(steps, onProgress)
  // The load of each technician-day in the range as it is now: placed and locked visits.
  const byId = new Map(state.plannerVisits.map(v => [v.id, v]))
  const now = new Map<string, Array<{ id: string, durationMinutes: number, lat: number, lon: number }>>()
  const put = (day: LocalDate, tech: string, id: string) => {
    const v = byId.get(id)
    if (!v || day < range.from || day > range.to) return
    const k = `${day}|${tech}`
    now.set(k, [...(now.get(k) ?? []), { id, durationMinutes: v.durationMinutes, lat: v.lat, lon: v.lon }])
  }
  for (const c of state.current) put(c.day, c.technicianId, c.visitId)
  for (const v of state.plannerVisits) if (v.locked) put(v.locked.day, v.locked.technicianId, v.id)
  const tech = new Map(state.technicians.map(t => [t.id, t]))
  const before = new Map([...now].map(([k, stops]) => {
    const [, tid] = k.split('|') as [string, string]
    const t = tech.get(tid)
    return [k, dayLoad(stops, t?.home ?? null, t?.capacityMinutes ?? 0)]
  }))
  const after = new Map(p.plan.days.filter(d => d.day >= range.from && d.day <= range.to).map(d => [`${d.day}|${d.technicianId}`, d]))
  const touched = new Set(p.moves.flatMap(m => [m.from, m.to].flatMap(x => (x ? [`${x.day}|${x.technicianId}`] : []))))
  const loads: ReplanDayLoad[] = [...touched].sort().map((k) => {
    const [day, technicianId] = k.split('|') as [LocalDate, string]
    const a = after.get(k)
    return {
      day, technicianId, capacityMinutes: tech.get(technicianId)?.capacityMinutes ?? 0,
      beforeMinutes: before.get(k)?.totalMinutes ?? 0, afterMinutes: a ? a.visitMinutes + a.driveMinutes : 0,
    }
  })
  const moves = p.moves.map(m => ({ ...m, why: moveWhy(m, before) }))
  return { moves, days: p.plan.days, loads }
}

/** Why the planner moves a visit, in plain words. */
function moveWhy(m: PlannerMove, before: Map<string, { over: boolean }>): string {
  if (!m.to) return m.reason ?? 'No day with room in its window'
  if (!m.from) return 'It had no place yet; this day has room'
  if (before.get(`${m.from.day}|${m.from.technicianId}`)?.over) return 'Its day was over capacity'
  if (m.from.day === m.to.day) return 'Evens out the technicians\' load that day'
  return 'Groups it with nearby stops and evens out the days'
}

/** Customer names and visit types of the visits a preview moves, for the board to show. */
async function movedVisits(tx: Tx, companyId: string, ids: string[]) {
  if (!ids.length) return []
  return tx.select({ id: visits.id, customerName: customers.name, visitType: visits.visitType, durationMinutes: visits.durationMinutes })
    .from(visits).innerJoin(customers, eq(customers.id, visits.customerId))
    .where(and(eq(visits.companyId, companyId), inArray(visits.id, ids)))
}

/** The moves "plan these weeks again" would make; nothing changes. `onProgress` hears how far it is. */
export async function replanPreview(actor: SessionUser, range: Range, onProgress?: (p: ReplanProgress) => void) {
  onProgress?.({ stage: 'reading', done: 0, total: 0 })
  return useDb().transaction(async (tx) => {
    const state = await loadReplan(tx, actor.companyId, range)
    const { moves, days, loads } = await preview(state, range, onProgress)
    const details = await movedVisits(tx, actor.companyId, moves.map(m => m.visitId))
    return { from: range.from, to: range.to, token: state.token, moves, days, loads, visits: details, applied: false }
  })
}

/** Applies the preview the token names, in one transaction; 409 when anything changed since. */
export async function replanApply(actor: SessionUser, range: Range, token: string, ip: string) {
  return useDb().transaction(async (tx) => {
    // One re-plan of a company at a time.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`replan:${actor.companyId}`}))`)
    const state = await loadReplan(tx, actor.companyId, range)
    if (state.token !== token) throw httpError(409, 'The schedule changed since the preview: look at the new preview before applying')
    const { moves, days, loads } = await preview(state, range)
    await writeMoves(tx, actor.companyId, state.company, moves)
    await recordAudit(tx, { action: 'schedule.replanned', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'company', subjectId: actor.companyId, ip, detail: { from: range.from, to: range.to, moves: moves.length } })
    const details = await movedVisits(tx, actor.companyId, moves.map(m => m.visitId))
    return { from: range.from, to: range.to, token: state.token, moves, days, loads, visits: details, applied: true }
  })
}

/** Moves per statement: 5 parameters each, well under PostgreSQL's 65,535 parameters. */
const MOVES_PER_STATEMENT = 5000

/**
 * Writes a preview's moves set-based (one `update … from (values …)` per few thousand moves): a
 * move with a day gets that day, its start time and technician; one without loses its technician
 * and keeps the reason. Each moved visit's sequence goes up by one.
 */
async function writeMoves(tx: Tx, companyId: string, company: { dayStartTime: string, timeZone: string }, moves: readonly PlannerMove[]) {
  for (let i = 0; i < moves.length; i += MOVES_PER_STATEMENT) {
    const rows = moves.slice(i, i + MOVES_PER_STATEMENT).map(m => sql`(${m.visitId}::uuid, ${m.to?.day ?? null}::date, ${m.to ? localTimeToInstant(m.to.day, company.dayStartTime, company.timeZone).toISOString() : null}::timestamptz, ${m.to?.technicianId ?? null}::uuid, ${m.to ? null : (m.reason ?? 'No day with room in its window')}::text)`)
    await tx.execute(sql`update visits as v set
        scheduled_on = coalesce(m.day, v.scheduled_on), starts_at = coalesce(m.starts_at, v.starts_at),
        technician_id = m.technician_id, unplaced_reason = m.reason, sequence = v.sequence + 1
      from (values ${sql.join(rows, sql`, `)}) as m(id, day, starts_at, technician_id, reason)
      where v.id = m.id and v.company_id = ${companyId}::uuid`)
  }
}

/**
 * The board's tray: scheduled visits in the range that the planner could not place and that nobody
 * has assigned since, with its reason (which names the window).
 */
export async function unplacedVisits(actor: SessionUser, range: Range) {
  const rows = await useDb().select({
    id: visits.id, scheduledOn: visits.scheduledOn, visitType: visits.visitType, durationMinutes: visits.durationMinutes, status: visits.status,
    customerId: visits.customerId, customerName: customers.name, siteId: visits.siteId, siteLine1: sites.line1, siteCity: sites.city,
    contractId: visits.contractId, reason: visits.unplacedReason, technicianId: visits.technicianId, moveReason: visits.moveReason,
  }).from(visits).innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
    .where(and(eq(visits.companyId, actor.companyId), eq(visits.status, 'scheduled'), isNotNull(visits.unplacedReason), isNull(visits.technicianId), between(visits.scheduledOn, range.from, range.to)))
    .orderBy(asc(visits.scheduledOn), asc(visits.id))
    .limit(1000)
  return { rows }
}
