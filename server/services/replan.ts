// "Plan these weeks again" and the tray of visits the planner could not place. The preview changes
// nothing; applying re-reads the visits, refuses (409) when anything changed since the preview,
// and writes exactly the preview's moves in one transaction.
import { createHash } from 'node:crypto'
import { and, asc, between, eq, gte, inArray, isNotNull, lte, sql } from 'drizzle-orm'
import { replanDateRange, type CurrentPlacement, type PlannerMove, type PlannerVisit } from '../../shared/utils/planner/index'
import { localTimeToInstant, type LocalDate } from '../../shared/utils/recurrence'
import { expandVisitSchedule } from '../../shared/utils/visit-windows'
import { templateVisitSchedule } from '../../shared/schemas/visit-schedule'
import { closedDays, companies, contracts, planVisitTemplates, sites, visits } from '../db/schema'
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
  const token = createHash('sha256').update(JSON.stringify([range.from, range.to, closed, technicians.map(t => [t.id, t.capacityMinutes]), rows.map(r => [r.id, r.day, r.technicianId, r.sequence, r.unplacedReason])])).digest('hex').slice(0, 40)
  return { company: company!, technicians, closed, plannerVisits, current, token }
}

function preview(state: Awaited<ReturnType<typeof loadReplan>>, range: Range) {
  if (!state.technicians.length) return { moves: [] as PlannerMove[], days: [] }
  const p = replanDateRange({ visits: state.plannerVisits, technicians: state.technicians, closedDays: state.closed }, state.current, range)
  return { moves: p.moves, days: p.plan.days }
}

/** The moves "plan these weeks again" would make; nothing changes. */
export async function replanPreview(actor: SessionUser, range: Range) {
  return useDb().transaction(async (tx) => {
    const state = await loadReplan(tx, actor.companyId, range)
    const { moves, days } = preview(state, range)
    return { from: range.from, to: range.to, token: state.token, moves, days, applied: false }
  })
}

/** Applies the preview the token names, in one transaction; 409 when anything changed since. */
export async function replanApply(actor: SessionUser, range: Range, token: string, ip: string) {
  return useDb().transaction(async (tx) => {
    // One re-plan of a company at a time.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`replan:${actor.companyId}`}))`)
    const state = await loadReplan(tx, actor.companyId, range)
    if (state.token !== token) throw httpError(409, 'The schedule changed since the preview: look at the new preview before applying')
    const { moves, days } = preview(state, range)
    for (const m of moves) {
      if (m.to) {
        await tx.update(visits).set({
          scheduledOn: m.to.day, startsAt: localTimeToInstant(m.to.day, state.company.dayStartTime, state.company.timeZone),
          technicianId: m.to.technicianId, unplacedReason: null, sequence: sql`${visits.sequence} + 1`,
        }).where(and(eq(visits.id, m.visitId), eq(visits.companyId, actor.companyId)))
      }
      else {
        await tx.update(visits).set({ technicianId: null, unplacedReason: m.reason ?? 'No day with room in its window', sequence: sql`${visits.sequence} + 1` })
          .where(and(eq(visits.id, m.visitId), eq(visits.companyId, actor.companyId)))
      }
    }
    await recordAudit(tx, { action: 'schedule.replanned', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'company', subjectId: actor.companyId, ip, detail: { from: range.from, to: range.to, moves: moves.length } })
    return { from: range.from, to: range.to, token: state.token, moves, days, applied: true }
  })
}

/** The board's tray: scheduled visits in the range that the planner could not place, with its reason. */
export async function unplacedVisits(actor: SessionUser, range: Range) {
  const rows = await useDb().select({
    id: visits.id, scheduledOn: visits.scheduledOn, visitType: visits.visitType, durationMinutes: visits.durationMinutes,
    customerId: visits.customerId, siteId: visits.siteId, contractId: visits.contractId, reason: visits.unplacedReason,
  }).from(visits)
    .where(and(eq(visits.companyId, actor.companyId), eq(visits.status, 'scheduled'), isNotNull(visits.unplacedReason), between(visits.scheduledOn, range.from, range.to)))
    .orderBy(asc(visits.scheduledOn), asc(visits.id))
    .limit(1000)
  return { rows }
}
