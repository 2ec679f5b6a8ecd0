import { and, asc, eq, gte, inArray, sql } from 'drizzle-orm'
import { localTimeToInstant, nearestWorkingDay, reconcileVisits, type PlannedVisit, type Reconciliation, type WorkCalendar } from '../../shared/utils/recurrence'
import { localToday, type LocalDate } from '../../shared/utils/company-time'
import { groupRows } from '../../shared/utils/collections'
import { expandVisitSchedule } from '../../shared/utils/visit-windows'
import { templateVisitSchedule } from '../../shared/schemas/visit-schedule'
import { closedDays, companies, contractFeatures, contracts, planVisitTemplates, visits, waterFeatures } from '../db/schema'
import type { Tx } from '../utils/db'
import { customerTechnicians, placeNewVisits, type TechnicianSpan, type VisitPlacement, type VisitToPlace } from './season-planning'
import { shapeDepthM, withSafety } from './visit-safety'

type TemplateRow = typeof planVisitTemplates.$inferSelect
type ContractRow = typeof contracts.$inferSelect
type CompanyRow = typeof companies.$inferSelect

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

export interface GenerationResult { inserted: number, rescheduled: number, cancelled: number, unplaced: Array<{ visitId: string, day: LocalDate, reason: string }> }

const NOTHING: GenerationResult = { inserted: 0, rescheduled: 0, cancelled: 0, unplaced: [] }

/**
 * Brings a contract's generated visits in line with its plan's templates and term: creates the
 * missing future visits, moves or cancels future unstarted ones, and leaves done, under-way,
 * skipped and manually moved visits alone. Runs inside the caller's transaction and locks the
 * contract row, so two regenerations cannot interleave.
 */
export async function regenerateContractVisits(tx: Tx, contractId: string, clock: GenerationClock = {}): Promise<GenerationResult> {
  return (await regenerateManyContractVisits(tx, [contractId], clock)).get(contractId) ?? { ...NOTHING, unplaced: [] }
}

/** One contract's regeneration worked out in memory, up to the planner. */
interface Prepared {
  contract: ContractRow
  company: CompanyRow
  closed: LocalDate[]
  templateOf: ReadonlyMap<string, TemplateRow>
  deepestAt: ReadonlyMap<string, number>
  plannedByKey: ReadonlyMap<string, WindowedVisit & { siteId: string }>
  existingById: ReadonlyMap<string, { id: string, generationKey: string | null, movedManually: boolean }>
  r: Reconciliation
  toPlace: VisitToPlace[]
  replacingVisitIds: string[]
}

/**
 * The same for many contracts at once (a batch of renewals, a plan or calendar change), set-based:
 * the contracts (locked), their companies, plans' templates, closed days, features and existing
 * visits are read with one query each for the whole batch, the windows are worked out once per
 * plan and term, the customers' technicians with one query, the planner runs once per company for
 * all the new visits together (so they share the technicians' capacity as one plan: never a
 * technician-day over capacity, a reason for each visit left unplaced), and the result is written
 * with one insert of every new visit, one update of every moved one and one of the cancelled ones.
 */
export async function regenerateManyContractVisits(tx: Tx, contractIds: readonly string[], clock: GenerationClock = {}): Promise<Map<string, GenerationResult>> {
  const out = new Map<string, GenerationResult>()
  const ids = [...new Set(contractIds)]
  if (!ids.length) return out
  // Locked in id order, so two batches sharing contracts lock them in the same order; worked
  // through in the order given (the planner breaks ties by the order of its visits).
  const position = new Map(ids.map((id, i) => [id, i]))
  const contractRows = (await tx.select().from(contracts).where(inArray(contracts.id, ids)).orderBy(asc(contracts.id)).for('update'))
    .sort((a, b) => position.get(a.id)! - position.get(b.id)!)
  if (!contractRows.length) return out
  const companyIds = [...new Set(contractRows.map(c => c.companyId))]
  const planIds = [...new Set(contractRows.map(c => c.planId))]
  const firstStart = contractRows.map(c => c.termStart).sort()[0]!
  // One connection inside a transaction: the reads run one after another.
  const companyRows = await tx.select().from(companies).where(inArray(companies.id, companyIds))
  const templateRows = await tx.select().from(planVisitTemplates).where(inArray(planVisitTemplates.planId, planIds)).orderBy(asc(planVisitTemplates.planId), asc(planVisitTemplates.position))
  const closedRows = await tx.select({ companyId: closedDays.companyId, day: closedDays.day }).from(closedDays).where(and(inArray(closedDays.companyId, companyIds), gte(closedDays.day, firstStart)))
  const shapeRows = await tx.select({ contractId: contractFeatures.contractId, siteId: waterFeatures.siteId, shape: waterFeatures.shape }).from(contractFeatures)
    .innerJoin(waterFeatures, eq(waterFeatures.id, contractFeatures.featureId))
    .where(inArray(contractFeatures.contractId, contractRows.map(c => c.id)))
  const existingRows = await tx.select({
    id: visits.id, contractId: visits.contractId, generationKey: visits.generationKey, status: visits.status, movedManually: visits.movedManually,
    scheduledOn: visits.scheduledOn, statusReason: visits.statusReason,
  }).from(visits).where(inArray(visits.contractId, contractRows.map(c => c.id)))

  const companyOf = new Map(companyRows.map(c => [c.id, c]))
  const templatesOf = groupRows(templateRows, t => t.planId)
  const closedOf = groupRows(closedRows, c => c.companyId)
  const shapesOf = groupRows(shapeRows, s => s.contractId)
  const existingOf = groupRows(existingRows, e => e.contractId!)
  // Contracts on the same plan and term (most of a renewal batch) share their windows.
  const windowsOf = new Map<string, WindowedVisit[]>()

  const prepared: Prepared[] = []
  for (const contract of contractRows) {
    const company = companyOf.get(contract.companyId)!
    const closed = (closedOf.get(contract.companyId) ?? []).filter(c => c.day >= contract.termStart).map(c => c.day)
    const closedSet = new Set(closed)
    const templates = templatesOf.get(contract.planId) ?? []
    const windowKey = `${contract.companyId}|${contract.planId}|${contract.termStart}|${contract.termEnd}`
    let dates = windowsOf.get(windowKey)
    if (!dates) {
      dates = windowVisitDates(templates, { start: contract.termStart, end: contract.termEnd }, { workingDays: company.workingDays, closed: closedSet })
      windowsOf.set(windowKey, dates)
    }
    // The deepest water at each site decides its safety items.
    const deepestAt = new Map<string, number>()
    for (const f of shapesOf.get(contract.id) ?? []) deepestAt.set(f.siteId, Math.max(deepestAt.get(f.siteId) ?? 0, shapeDepthM(f.shape)))
    const existing = existingOf.get(contract.id) ?? []
    const today = localToday(company.timeZone, clock.now)
    // A contract's features may sit on more than one site of the customer: one visit per site.
    const planned: Array<WindowedVisit & { siteId: string }> = [...deepestAt.keys()].flatMap(siteId => dates.map(d => ({ ...d, key: `${d.key}:${siteId}`, siteId })))
    // A visit the planner placed elsewhere in its window stays there while that day is still open.
    const existingByKey = new Map(existing.filter(e => e.generationKey).map(e => [e.generationKey!, e]))
    for (const p of planned) {
      const e = existingByKey.get(p.key)
      if (!e || e.status !== 'scheduled' || e.scheduledOn < p.earliest || e.scheduledOn > p.latest || closedSet.has(e.scheduledOn)) continue
      const weekday = new Date(`${e.scheduledOn}T12:00:00Z`).getUTCDay() || 7
      if (company.workingDays.includes(weekday)) p.date = e.scheduledOn
    }
    const r = reconcileVisits(existing, planned, today)
    const templateOf = new Map(templates.map(t => [t.id, t]))
    // New visits, and moved ones a person did not place, go to the planner (as on activation): a day
    // in their window and a technician with room.
    const plannedByKey = new Map(planned.map(p => [p.key, p]))
    const existingById = new Map(existing.map(e => [e.id, e]))
    const replanned = r.reschedule.filter(m => !existingById.get(m.id)!.movedManually && plannedByKey.has(existingById.get(m.id)!.generationKey ?? ''))
    const toPlace: VisitToPlace[] = [
      ...r.insert.map(p => ({ key: p.key, date: p.date })),
      ...replanned.map(m => ({ key: existingById.get(m.id)!.generationKey!, date: m.date })),
    ].map(({ key, date }) => {
      const w = plannedByKey.get(key)!
      return { key, earliest: w.earliest, latest: w.latest, preferred: date, durationMinutes: templateOf.get(w.templateId)!.durationMinutes, siteId: w.siteId, customerId: contract.customerId }
    })
    prepared.push({ contract, company, closed, templateOf, deepestAt, plannedByKey, existingById, r, toPlace, replacingVisitIds: replanned.map(m => m.id) })
  }

  // The customer keeps their technician where possible: who has most of this term's visits, else
  // who did most of the previous term's (one query for the whole batch).
  const placing = prepared.filter(g => g.toPlace.length)
  const previousTerms = await previousTermsOf(tx, placing.map(g => g.contract))
  const spans: TechnicianSpan[] = placing.flatMap(({ contract: c }) => {
    const prev = c.previousContractId ? previousTerms.get(c.previousContractId) : undefined
    return [
      { key: `${c.id}|this`, companyId: c.companyId, customerId: c.customerId, start: c.termStart, end: c.termEnd },
      ...(prev ? [{ key: `${c.id}|previous`, companyId: c.companyId, customerId: c.customerId, start: prev.start, end: prev.end }] : []),
    ]
  })
  const technicianOf = await customerTechnicians(tx, spans)

  const placementOf = new Map<string, Map<string, VisitPlacement>>()
  for (const group of groupRows(placing, g => g.company.id).values()) {
    const toPlace = group.flatMap(g => g.toPlace.map(v => ({ ...v, key: `${g.contract.id}|${v.key}` })))
    const previousAssignments: Record<string, string> = {}
    for (const { contract: c } of group) {
      const keeper = technicianOf.get(`${c.id}|this`) ?? technicianOf.get(`${c.id}|previous`)
      if (keeper && !(c.customerId in previousAssignments)) previousAssignments[c.customerId] = keeper
    }
    const term = { start: group.map(g => g.contract.termStart).sort()[0]!, end: group.map(g => g.contract.termEnd).sort().at(-1)! }
    const closed = [...new Set(group.flatMap(g => g.closed))].sort()
    const placed = await placeNewVisits(tx, group[0]!.company, term, closed, toPlace, { replacingVisitIds: group.flatMap(g => g.replacingVisitIds), previousAssignments })
    for (const [key, p] of placed) {
      const cut = key.indexOf('|')
      const contractId = key.slice(0, cut)
      let mine = placementOf.get(contractId)
      if (!mine) placementOf.set(contractId, (mine = new Map()))
      mine.set(key.slice(cut + 1), p)
    }
  }

  await writeGeneration(tx, prepared, placementOf, out)
  return out
}

/** The visit rows of a batch as one statement each: every insert, every move, every cancellation. */
async function writeGeneration(tx: Tx, prepared: readonly Prepared[], placementOf: ReadonlyMap<string, ReadonlyMap<string, VisitPlacement>>, out: Map<string, GenerationResult>) {
  const inserts: Array<Record<string, unknown>> = []
  const moves: Array<Record<string, unknown>> = []
  const cancels: string[] = []
  /** Visits the planner could not place: they wait unassigned on their preferred day, with the reason. */
  const movedUnplaced = new Map<string, GenerationResult['unplaced']>()
  const startsAt = new Map<string, string>()
  // Most visits share a checklist (their template's with the season's safety lines): each distinct
  // one goes once, and a row names it by its place, so a batch's parameter stays small.
  const checklists: unknown[] = []
  const checklistAt = new Map<string, number>()
  const checklistIndex = (items: unknown) => {
    const key = JSON.stringify(items)
    let at = checklistAt.get(key)
    if (at === undefined) {
      checklistAt.set(key, (at = checklists.length))
      checklists.push(items)
    }
    return at
  }
  const startOf = (company: CompanyRow, day: LocalDate) => {
    const key = `${company.timeZone}|${company.dayStartTime}|${day}`
    let at = startsAt.get(key)
    if (!at) startsAt.set(key, (at = localTimeToInstant(day, company.dayStartTime, company.timeZone).toISOString()))
    return at
  }
  for (const g of prepared) {
    const { contract, company, r } = g
    const placement = placementOf.get(contract.id) ?? new Map<string, VisitPlacement>()
    for (const p of r.insert) {
      const t = g.templateOf.get(p.templateId)!
      const siteId = g.plannedByKey.get(p.key)!.siteId
      const placed = placement.get(p.key) ?? { day: p.date, technicianId: null, unplacedReason: null }
      inserts.push({
        company_id: contract.companyId, contract_id: contract.id, template_id: t.id, customer_id: contract.customerId, site_id: siteId,
        visit_type: t.visitType, scheduled_on: placed.day, starts_at: startOf(company, placed.day), duration_minutes: t.durationMinutes,
        technician_id: placed.technicianId, unplaced_reason: placed.unplacedReason, generation_key: p.key,
        checklist: checklistIndex(withSafety(t.checklist.map(c => c.label), { visitType: t.visitType, date: placed.day, deepestM: g.deepestAt.get(siteId) ?? null, latitude: company.baseLatitude })),
      })
    }
    const unplaced: GenerationResult['unplaced'] = []
    for (const m of r.reschedule) {
      const e = g.existingById.get(m.id)!
      const p = g.plannedByKey.get(e.generationKey!)
      const t = p ? g.templateOf.get(p.templateId)! : null
      // A visit a person moved keeps its day and technician; the rest take the planner's place.
      const placed = e.movedManually ? undefined : placement.get(e.generationKey!)
      const day = placed?.day ?? m.date
      moves.push({
        id: m.id, day, starts_at: startOf(company, day), placed: Boolean(placed), technician_id: placed?.technicianId ?? null, unplaced_reason: placed?.unplacedReason ?? null,
        duration_minutes: t?.durationMinutes ?? null, visit_type: t?.visitType ?? null, revive: m.revive,
      })
      if (placed?.unplacedReason) unplaced.push({ visitId: m.id, day, reason: placed.unplacedReason })
    }
    movedUnplaced.set(contract.id, unplaced)
    cancels.push(...r.cancel)
  }

  const insertedOf = new Map<string, Map<string, { id: string, day: LocalDate, reason: string | null }>>()
  if (inserts.length) {
    const { rows } = await tx.execute<{ id: string, contract_id: string, generation_key: string, scheduled_on: string, unplaced_reason: string | null }>(sql`
      with c as (select (n - 1)::int as at, value as checklist from jsonb_array_elements(${JSON.stringify(checklists)}::jsonb) with ordinality as e(value, n))
      insert into visits (company_id, contract_id, template_id, customer_id, site_id, visit_type, scheduled_on, starts_at, duration_minutes, technician_id, unplaced_reason, generation_key, checklist)
      select v.company_id, v.contract_id, v.template_id, v.customer_id, v.site_id, v.visit_type::visit_type, v.scheduled_on, v.starts_at, v.duration_minutes, v.technician_id, v.unplaced_reason, v.generation_key, c.checklist
      from jsonb_to_recordset(${JSON.stringify(inserts)}::jsonb) as v(company_id uuid, contract_id uuid, template_id uuid, customer_id uuid, site_id uuid, visit_type text, scheduled_on date,
        starts_at timestamptz, duration_minutes integer, technician_id uuid, unplaced_reason text, generation_key text, checklist integer)
      join c on c.at = v.checklist
      on conflict do nothing
      returning id, contract_id, generation_key, scheduled_on::text as scheduled_on, unplaced_reason`)
    for (const row of rows) {
      let mine = insertedOf.get(row.contract_id)
      if (!mine) insertedOf.set(row.contract_id, (mine = new Map()))
      mine.set(row.generation_key, { id: row.id, day: row.scheduled_on, reason: row.unplaced_reason })
    }
  }
  if (moves.length) {
    await tx.execute(sql`
      update visits as v set
        scheduled_on = m.day, starts_at = m.starts_at,
        technician_id = case when m.placed then m.technician_id else v.technician_id end,
        unplaced_reason = case when m.placed then m.unplaced_reason else v.unplaced_reason end,
        duration_minutes = coalesce(m.duration_minutes, v.duration_minutes), visit_type = coalesce(m.visit_type::visit_type, v.visit_type),
        status = case when m.revive then 'scheduled'::visit_status else v.status end, status_reason = case when m.revive then '' else v.status_reason end,
        sequence = v.sequence + 1, updated_at = now()
      from jsonb_to_recordset(${JSON.stringify(moves)}::jsonb) as m(id uuid, day date, starts_at timestamptz, placed boolean, technician_id uuid, unplaced_reason text, duration_minutes integer, visit_type text, revive boolean)
      where v.id = m.id`)
  }
  if (cancels.length) {
    await tx.update(visits).set({ status: 'cancelled', statusReason: 'No longer in the plan', sequence: sql`${visits.sequence} + 1` })
      .where(inArray(visits.id, cancels))
  }
  for (const g of prepared) {
    const inserted = insertedOf.get(g.contract.id)
    const unplaced: GenerationResult['unplaced'] = []
    for (const p of g.r.insert) {
      const row = inserted?.get(p.key)
      if (row?.reason) unplaced.push({ visitId: row.id, day: row.day, reason: row.reason })
    }
    unplaced.push(...movedUnplaced.get(g.contract.id)!)
    out.set(g.contract.id, { inserted: g.r.insert.length, rescheduled: g.r.reschedule.length, cancelled: g.r.cancel.length, unplaced })
  }
}

/** The terms the contracts renew (start and end of each previous contract). */
async function previousTermsOf(tx: Tx, rows: readonly ContractRow[]) {
  const ids = [...new Set(rows.flatMap(c => (c.previousContractId ? [c.previousContractId] : [])))]
  if (!ids.length) return new Map<string, { start: LocalDate, end: LocalDate }>()
  const prev = await tx.select({ id: contracts.id, start: contracts.termStart, end: contracts.termEnd }).from(contracts).where(inArray(contracts.id, ids))
  return new Map(prev.map(p => [p.id, { start: p.start, end: p.end }]))
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
