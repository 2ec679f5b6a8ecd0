// Places a contract's new visits with the season planner (shared/utils/planner): inside their
// windows, on open working days, within each technician's capacity (visits and driving), next to
// the company's already-scheduled visits in the term, which stay where they are and count as
// locked. What finds no place keeps its preferred day, unassigned, with the planner's reason.
// A renewed contract's customer keeps the technician who did most of their last term's visits.
import { and, asc, eq, gte, inArray, isNotNull, lte, notInArray, sql } from 'drizzle-orm'
import { planSeason, type PlannerTechnician, type PlannerVisit } from '../../shared/utils/planner/index'
import type { LocalDate } from '../../shared/utils/company-time'
import { sites, staffProfiles, users, visits } from '../db/schema'
import type { Tx } from '../utils/db'
import { daysOffByTechnician } from './technician-days'

export interface VisitToPlace {
  key: string
  earliest: LocalDate
  latest: LocalDate
  preferred: LocalDate
  durationMinutes: number
  siteId: string
  customerId: string
}

export interface VisitPlacement { day: LocalDate, technicianId: string | null, unplacedReason: string | null }

export interface PlanningCompany { id: string, workingDays: readonly number[], baseLatitude: number | null, baseLongitude: number | null }

/**
 * The company's active technicians as the planner sees them: their own working weekdays (else the
 * company's), their days off, and their home (their own, else the company's base).
 */
export async function planningTechnicians(tx: Tx, company: PlanningCompany): Promise<PlannerTechnician[]> {
  const rows = await tx.select({
    id: users.id, name: users.name, capacity: staffProfiles.capacityMinutes, lat: staffProfiles.homeLatitude, lon: staffProfiles.homeLongitude,
    workingDays: staffProfiles.workingDays,
  })
    .from(users).leftJoin(staffProfiles, eq(staffProfiles.userId, users.id))
    .where(and(eq(users.companyId, company.id), eq(users.role, 'technician'), eq(users.active, true)))
    .orderBy(asc(users.name))
  const base = companyBase(company)
  const daysOff = await daysOffByTechnician(tx, company.id)
  return rows.map(t => ({
    id: t.id, name: t.name, capacityMinutes: t.capacity ?? 420, workingDays: t.workingDays ?? company.workingDays,
    daysOff: daysOff.get(t.id) ?? [], home: { lat: t.lat ?? base.lat, lon: t.lon ?? base.lon },
  }))
}

export function companyBase(company: PlanningCompany) {
  return { lat: company.baseLatitude ?? 0, lon: company.baseLongitude ?? 0 }
}

export interface PlacementOptions {
  /** Scheduled visits being placed again (regeneration): they do not count as booked where they are now. */
  replacingVisitIds?: readonly string[]
  /** customerId → technicianId: who served the customer before, kept where they have room. */
  previousAssignments?: Readonly<Record<string, string>>
}

export async function placeNewVisits(
  tx: Tx, company: PlanningCompany, term: { start: LocalDate, end: LocalDate }, closed: readonly LocalDate[],
  toPlace: readonly VisitToPlace[], opts: PlacementOptions = {},
): Promise<Map<string, VisitPlacement>> {
  const out = new Map<string, VisitPlacement>()
  if (!toPlace.length) return out
  const technicians = await planningTechnicians(tx, company)
  if (!technicians.length) {
    for (const v of toPlace) out.set(v.key, { day: v.preferred, technicianId: null, unplacedReason: 'No technician to plan with yet: add one to the team, then plan these weeks again' })
    return out
  }
  const booked = await tx.select({ id: visits.id, day: visits.scheduledOn, technicianId: visits.technicianId, durationMinutes: visits.durationMinutes, siteId: visits.siteId, customerId: visits.customerId })
    .from(visits)
    .where(and(
      eq(visits.companyId, company.id), eq(visits.status, 'scheduled'), isNotNull(visits.technicianId),
      gte(visits.scheduledOn, term.start), lte(visits.scheduledOn, term.end),
      ...(opts.replacingVisitIds?.length ? [notInArray(visits.id, [...opts.replacingVisitIds])] : []),
    ))
  const siteIds = [...new Set([...toPlace.map(v => v.siteId), ...booked.map(b => b.siteId)])]
  const siteRows = await tx.select({ id: sites.id, lat: sites.latitude, lon: sites.longitude }).from(sites).where(inArray(sites.id, siteIds))
  const base = companyBase(company)
  const where = new Map(siteRows.map(s => [s.id, { lat: s.lat ?? base.lat, lon: s.lon ?? base.lon }]))
  const at = (siteId: string) => where.get(siteId) ?? base
  const techIds = new Set(technicians.map(t => t.id))
  const planner: PlannerVisit[] = [
    ...booked.filter(b => techIds.has(b.technicianId!)).map(b => ({
      id: `locked:${b.id}`, windowEarliest: b.day, windowLatest: b.day, preferred: b.day, durationMinutes: Math.max(1, b.durationMinutes),
      siteId: b.siteId, customerId: b.customerId, ...at(b.siteId), locked: { day: b.day, technicianId: b.technicianId! },
    })),
    ...toPlace.map(v => ({
      id: `new:${v.key}`, windowEarliest: v.earliest, windowLatest: v.latest, preferred: v.preferred, durationMinutes: Math.max(1, v.durationMinutes),
      siteId: v.siteId, customerId: v.customerId, ...at(v.siteId),
    })),
  ]
  // Only the new visits are written: the days holding nothing but booked visits need no answer.
  const plan = planSeason({ visits: planner, closedDays: closed, technicians, previousAssignments: opts.previousAssignments, onlyPlannedDays: true })
  for (const p of plan.placed) {
    if (p.visitId.startsWith('new:')) out.set(p.visitId.slice(4), { day: p.day, technicianId: p.technicianId, unplacedReason: null })
  }
  const byId = new Map(toPlace.map(v => [`new:${v.key}`, v]))
  for (const u of plan.unplaced) {
    if (!u.visitId.startsWith('new:')) continue
    const v = byId.get(u.visitId)!
    out.set(v.key, { day: v.preferred, technicianId: null, unplacedReason: u.reason })
  }
  return out
}

/** A customer and a span of days, named by `key`: whose visits were they mostly? */
export interface TechnicianSpan { key: string, companyId: string, customerId: string, start: LocalDate, end: LocalDate }

/**
 * For each span, the technician who did most of the customer's visits between its two days (done
 * visits first, then any assigned visit not cancelled; ties to the lower id), with one query for
 * all of them: the renewal's "keep the customer's technician". Spans with no such visit are absent.
 */
export async function customerTechnicians(tx: Tx, spans: readonly TechnicianSpan[]): Promise<Map<string, string>> {
  const out = new Map<string, string>()
  if (!spans.length) return out
  const { rows } = await tx.execute<{ key: string, technician_id: string }>(sql`
    select distinct on (s.key) s.key, v.technician_id
    from jsonb_to_recordset(${JSON.stringify(spans)}::jsonb) as s(key text, "companyId" uuid, "customerId" uuid, start date, "end" date)
    join visits v on v.customer_id = s."customerId" and v.company_id = s."companyId" and v.scheduled_on between s.start and s."end"
      and v.technician_id is not null and v.status in ('done', 'in_progress', 'scheduled')
    group by s.key, v.technician_id
    order by s.key, count(*) filter (where v.status = 'done') desc, count(*) desc, v.technician_id asc`)
  for (const r of rows) out.set(r.key, r.technician_id)
  return out
}
