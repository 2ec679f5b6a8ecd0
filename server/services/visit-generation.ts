import { and, asc, eq, gte, inArray, sql } from 'drizzle-orm'
import { localTimeToInstant, nearestWorkingDay, reconcileVisits, type PlannedVisit, type WorkCalendar } from '../../shared/utils/recurrence'
import { localToday, type LocalDate } from '../../shared/utils/company-time'
import { expandVisitSchedule } from '../../shared/utils/visit-windows'
import { templateVisitSchedule } from '../../shared/schemas/visit-schedule'
import { closedDays, companies, contractFeatures, contracts, planVisitTemplates, visits, waterFeatures } from '../db/schema'
import type { Tx } from '../utils/db'
import { customerTechnician, placeNewVisits, type VisitPlacement, type VisitToPlace } from './season-planning'
import { shapeDepthM, withSafety } from './visit-safety'

type TemplateRow = typeof planVisitTemplates.$inferSelect

/**
 * One visit per window of each template in the term, on the working, open day nearest the
 * window's preferred day (inside the window where it has one). Two windows landing on one day make one visit.
 */
export type WindowedVisit = PlannedVisit & { earliest: LocalDate, latest: LocalDate }

export function windowVisitDates(templates: readonly TemplateRow[], term: { start: LocalDate, end: LocalDate }, cal: WorkCalendar): WindowedVisit[] {
  const out: WindowedVisit[] = []
  for (const t of templates) {
    const taken = new Set<LocalDate>()
    for (const w of expandVisitSchedule(templateVisitSchedule(t), term)) {
      // Until the planner places visits, a window with no working, open day (a give-or-take of 0
      // on a weekend) takes the nearest one in the term, as rules did before windows.
      const date = nearestWorkingDay(w.preferred, cal, { from: w.earliest, to: w.latest }) ?? nearestWorkingDay(w.preferred, cal, { from: term.start, to: term.end })
      if (!date || taken.has(date)) continue
      taken.add(date)
      const inWindow = date >= w.earliest && date <= w.latest
      out.push({ key: `${t.id}:${w.key}`, templateId: t.id, originalDate: w.preferred, date, earliest: inWindow ? w.earliest : date, latest: inWindow ? w.latest : date })
    }
  }
  return out.sort((a, b) => a.date.localeCompare(b.date) || a.key.localeCompare(b.key))
}

/** The clock generation uses; tests and the demo seed pass their own. */
export interface GenerationClock { now?: Date }

/**
 * Brings a contract's generated visits in line with its plan's templates and term: creates the
 * missing future visits, moves or cancels future unstarted ones, and leaves done, under-way,
 * skipped and manually moved visits alone. Runs inside the caller's transaction and locks the
 * contract row, so two regenerations cannot interleave.
 */
export async function regenerateContractVisits(tx: Tx, contractId: string, clock: GenerationClock = {}): Promise<GenerationResult> {
  const g = await prepareGeneration(tx, contractId, clock)
  if (!g) return { inserted: 0, rescheduled: 0, cancelled: 0, unplaced: [] }
  const placement = g.toPlace.length
    ? await placeNewVisits(tx, g.company, g.term, g.closed, g.toPlace, { replacingVisitIds: g.replacingVisitIds, ...(g.keeper && { previousAssignments: { [g.customerId]: g.keeper } }) })
    : new Map<string, VisitPlacement>()
  return g.finish(placement)
}

/**
 * The same for many contracts (a batch of renewals): each contract's visits are worked out as
 * above, but the planner runs once per company for all of them together, so the new visits of
 * the batch share the technicians' capacity as one plan (never a technician-day over capacity,
 * a reason for each visit left unplaced) instead of one planner run per contract.
 */
export async function regenerateManyContractVisits(tx: Tx, contractIds: readonly string[], clock: GenerationClock = {}): Promise<Map<string, GenerationResult>> {
  const prepared: Prepared[] = []
  for (const id of contractIds) {
    const g = await prepareGeneration(tx, id, clock)
    if (g) prepared.push(g)
  }
  const out = new Map<string, GenerationResult>()
  const byCompany = new Map<string, Prepared[]>()
  for (const g of prepared) byCompany.set(g.company.id, [...(byCompany.get(g.company.id) ?? []), g])
  for (const group of byCompany.values()) {
    const toPlace = group.flatMap(g => g.toPlace.map(v => ({ ...v, key: `${g.contractId}|${v.key}` })))
    const previousAssignments: Record<string, string> = {}
    for (const g of group) if (g.keeper && !(g.customerId in previousAssignments)) previousAssignments[g.customerId] = g.keeper
    const term = { start: group.map(g => g.term.start).sort()[0]!, end: group.map(g => g.term.end).sort().at(-1)! }
    const placed = toPlace.length
      ? await placeNewVisits(tx, group[0]!.company, term, [...new Set(group.flatMap(g => g.closed))].sort(), toPlace, { replacingVisitIds: group.flatMap(g => g.replacingVisitIds), previousAssignments })
      : new Map<string, VisitPlacement>()
    for (const g of group) {
      const mine = new Map<string, VisitPlacement>()
      const prefix = `${g.contractId}|`
      for (const [key, p] of placed) if (key.startsWith(prefix)) mine.set(key.slice(prefix.length), p)
      out.set(g.contractId, await g.finish(mine))
    }
  }
  return out
}

export interface GenerationResult { inserted: number, rescheduled: number, cancelled: number, unplaced: Array<{ visitId: string, day: LocalDate, reason: string }> }

interface Prepared {
  contractId: string
  customerId: string
  company: typeof companies.$inferSelect
  term: { start: LocalDate, end: LocalDate }
  closed: LocalDate[]
  toPlace: VisitToPlace[]
  replacingVisitIds: string[]
  keeper: string | null
  /** Writes the visits once the planner has placed `toPlace`. */
  finish: (placement: Map<string, VisitPlacement>) => Promise<GenerationResult>
}

/** Everything of one contract's regeneration up to the planner: what to insert, move, cancel, and what to place. */
async function prepareGeneration(tx: Tx, contractId: string, clock: GenerationClock): Promise<Prepared | null> {
  const [contract] = await tx.select().from(contracts).where(eq(contracts.id, contractId)).for('update').limit(1)
  if (!contract) return null
  const [company] = await tx.select().from(companies).where(eq(companies.id, contract.companyId)).limit(1)
  // One connection inside a transaction: run the reads one after another.
  const templates = await tx.select().from(planVisitTemplates).where(eq(planVisitTemplates.planId, contract.planId)).orderBy(asc(planVisitTemplates.position))
  const closed = await tx.select({ day: closedDays.day }).from(closedDays).where(and(eq(closedDays.companyId, contract.companyId), gte(closedDays.day, contract.termStart)))
  const contractShapes = await tx.select({ siteId: waterFeatures.siteId, shape: waterFeatures.shape }).from(contractFeatures)
    .innerJoin(waterFeatures, eq(waterFeatures.id, contractFeatures.featureId))
    .where(eq(contractFeatures.contractId, contractId))
  // The deepest water at each site decides its safety items.
  const deepestAt = new Map<string, number>()
  for (const f of contractShapes) deepestAt.set(f.siteId, Math.max(deepestAt.get(f.siteId) ?? 0, shapeDepthM(f.shape)))
  const featureSites = [...deepestAt.keys()].map(siteId => ({ siteId }))
  const existing = await tx.select({
    id: visits.id, generationKey: visits.generationKey, status: visits.status, movedManually: visits.movedManually,
    scheduledOn: visits.scheduledOn, statusReason: visits.statusReason,
  }).from(visits).where(eq(visits.contractId, contractId))
  const tz = company!.timeZone
  const today = localToday(tz, clock.now)
  const dates = windowVisitDates(templates, { start: contract.termStart, end: contract.termEnd }, { workingDays: company!.workingDays, closed: new Set(closed.map(c => c.day)) })
  // A contract's features may sit on more than one site of the customer: one visit per site.
  const planned: Array<WindowedVisit & { siteId: string }> = featureSites.flatMap(({ siteId }) => dates.map(d => ({ ...d, key: `${d.key}:${siteId}`, siteId })))
  // A visit the planner placed elsewhere in its window stays there while that day is still open.
  const closedSet = new Set(closed.map(c => c.day))
  const existingByKey = new Map(existing.filter(e => e.generationKey).map(e => [e.generationKey!, e]))
  for (const p of planned) {
    const e = existingByKey.get(p.key)
    if (!e || e.status !== 'scheduled' || e.scheduledOn < p.earliest || e.scheduledOn > p.latest || closedSet.has(e.scheduledOn)) continue
    const weekday = new Date(`${e.scheduledOn}T12:00:00Z`).getUTCDay() || 7
    if (company!.workingDays.includes(weekday)) p.date = e.scheduledOn
  }
  const r = reconcileVisits(existing, planned, today)
  const template = new Map(templates.map(t => [t.id, t]))
  const startOf = (date: string) => localTimeToInstant(date, company!.dayStartTime, tz)

  // New visits, and moved ones a person did not place, go to the planner (as on activation): a day
  // in their window and a technician with room. The customer keeps their technician where possible:
  // who has most of this term's visits, else who did most of the previous term's.
  const plannedByKey = new Map(planned.map(p => [p.key, p]))
  const existingById = new Map(existing.map(e => [e.id, e]))
  const replanned = r.reschedule.filter(m => !existingById.get(m.id)!.movedManually && plannedByKey.has(existingById.get(m.id)!.generationKey ?? ''))
  const toPlace: VisitToPlace[] = [
    ...r.insert.map(p => ({ key: p.key, date: p.date })),
    ...replanned.map(m => ({ key: existingById.get(m.id)!.generationKey!, date: m.date })),
  ].map(({ key, date }) => {
    const w = plannedByKey.get(key)!
    return { key, earliest: w.earliest, latest: w.latest, preferred: date, durationMinutes: template.get(w.templateId)!.durationMinutes, siteId: w.siteId, customerId: contract.customerId }
  })
  const keeper = toPlace.length
    ? await customerTechnician(tx, contract.companyId, contract.customerId, { start: contract.termStart, end: contract.termEnd })
      ?? (contract.previousContractId ? await previousTermTechnician(tx, contract) : null)
    : null
  const finish = async (placement: Map<string, VisitPlacement>): Promise<GenerationResult> => {
  /** Visits the planner could not place: they wait unassigned on their preferred day, with the reason. */
  const unplaced: Array<{ visitId: string, day: LocalDate, reason: string }> = []
  if (r.insert.length) {
    const inserted = await tx.insert(visits).values(r.insert.map((p) => {
      const t = template.get(p.templateId)!
      const siteId = plannedByKey.get(p.key)!.siteId
      const placed = placement.get(p.key) ?? { day: p.date, technicianId: null, unplacedReason: null }
      return {
        companyId: contract.companyId, contractId, templateId: t.id, customerId: contract.customerId, siteId,
        visitType: t.visitType, scheduledOn: placed.day, startsAt: startOf(placed.day), durationMinutes: t.durationMinutes,
        technicianId: placed.technicianId, unplacedReason: placed.unplacedReason,
        generationKey: p.key,
        checklist: withSafety(t.checklist.map(c => c.label), { visitType: t.visitType, date: placed.day, deepestM: deepestAt.get(siteId) ?? null, latitude: company!.baseLatitude }),
      }
    })).onConflictDoNothing().returning({ id: visits.id, day: visits.scheduledOn, reason: visits.unplacedReason })
    for (const row of inserted) if (row.reason) unplaced.push({ visitId: row.id, day: row.day, reason: row.reason })
  }
  for (const m of r.reschedule) {
    const key = existingById.get(m.id)!.generationKey!
    const p = plannedByKey.get(key)
    const t = p ? template.get(p.templateId)! : null
    // A visit a person moved keeps its day and technician; the rest take the planner's place.
    const placed = existingById.get(m.id)!.movedManually ? undefined : placement.get(key)
    const day = placed?.day ?? m.date
    await tx.update(visits).set({
      scheduledOn: day, startsAt: startOf(day),
      ...(placed && { technicianId: placed.technicianId, unplacedReason: placed.unplacedReason }),
      ...(t && { durationMinutes: t.durationMinutes, visitType: t.visitType }),
      ...(m.revive && { status: 'scheduled' as const, statusReason: '' }),
      sequence: sql`${visits.sequence} + 1`,
    }).where(eq(visits.id, m.id))
    if (placed?.unplacedReason) unplaced.push({ visitId: m.id, day, reason: placed.unplacedReason })
  }
  if (r.cancel.length) {
    await tx.update(visits).set({ status: 'cancelled', statusReason: 'No longer in the plan', sequence: sql`${visits.sequence} + 1` })
      .where(inArray(visits.id, r.cancel))
  }
  return { inserted: r.insert.length, rescheduled: r.reschedule.length, cancelled: r.cancel.length, unplaced }
  }
  return {
    contractId, customerId: contract.customerId, company: company!, term: { start: contract.termStart, end: contract.termEnd }, closed: closed.map(c => c.day),
    toPlace, replacingVisitIds: replanned.map(m => m.id), keeper, finish,
  }
}

/** Who did most of the customer's visits in the term this contract renews. */
async function previousTermTechnician(tx: Tx, contract: typeof contracts.$inferSelect) {
  const [prev] = await tx.select({ start: contracts.termStart, end: contracts.termEnd }).from(contracts).where(eq(contracts.id, contract.previousContractId!)).limit(1)
  return prev ? customerTechnician(tx, contract.companyId, contract.customerId, prev) : null
}

/** Cancels a contract's future, unstarted visits (pause, end, cancel), with the reason shown to people. */
export async function cancelFutureVisits(tx: Tx, contractId: string, reason: string, clock: GenerationClock = {}) {
  const [row] = await tx.select({ tz: companies.timeZone }).from(contracts).innerJoin(companies, eq(companies.id, contracts.companyId)).where(eq(contracts.id, contractId)).limit(1)
  if (!row) return 0
  const today = localToday(row.tz, clock.now)
  const cancelled = await tx.update(visits).set({ status: 'cancelled', statusReason: reason, sequence: sql`${visits.sequence} + 1` })
    .where(and(eq(visits.contractId, contractId), eq(visits.status, 'scheduled'), gte(visits.scheduledOn, today)))
    .returning({ id: visits.id })
  return cancelled.length
}
