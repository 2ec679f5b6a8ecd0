// Plans the demo's seasons with the season planner, as activation does (planningTechnicians +
// planSeason), but for the whole book at once: every contract's visits get their day and
// technician from one call per season, so no technician-day is over capacity (visits and driving)
// and each day's stops lie in one area. So that the demo looks alive on whatever day it is
// seeded, visits whose window holds the company's today are put on today first — up to about
// three quarters of each technician's day, from their own territory — and the planner places
// everything else around them.
import { and, eq, inArray } from 'drizzle-orm'
import { closedDays, contracts, planVisitTemplates, sites, visits } from '../../server/db/schema'
import { companyBase, planningTechnicians } from '../../server/services/season-planning'
import { windowVisitDates } from '../../server/services/visit-generation'
import type { Tx } from '../../server/utils/db'
import { dayLoad } from '../../shared/utils/day-load'
import { planSeason, type PlannerTechnician, type PlannerVisit, type SeasonPlan } from '../../shared/utils/planner/index'
import { localTimeToInstant } from '../../shared/utils/recurrence'
import type { LocalDate } from '../../shared/utils/company-time'

export interface DemoPlanningCompany {
  id: string
  timeZone: string
  dayStartTime: string
  workingDays: readonly number[]
  baseLatitude: number | null
  baseLongitude: number | null
}

/** Share of a technician's day the seed fills with today's stops (the planner may add more). */
const TODAY_FILL = 0.75

interface VisitRow { id: string, contractId: string, key: string, siteId: string, customerId: string, durationMinutes: number }

async function seasonVisits(tx: Tx, company: DemoPlanningCompany, contractIds: readonly string[]) {
  const rows = await tx.select({ id: visits.id, contractId: visits.contractId, key: visits.generationKey, siteId: visits.siteId, customerId: visits.customerId, durationMinutes: visits.durationMinutes })
    .from(visits).where(and(inArray(visits.contractId, [...contractIds]), eq(visits.status, 'scheduled')))
  const contractRows = await tx.select().from(contracts).where(inArray(contracts.id, [...contractIds]))
  const closed = (await tx.select({ day: closedDays.day }).from(closedDays).where(eq(closedDays.companyId, company.id))).map(c => c.day)
  const templatesByPlan = new Map<string, Array<typeof planVisitTemplates.$inferSelect>>()
  const windowOf = new Map<string, { earliest: LocalDate, latest: LocalDate, preferred: LocalDate }>()
  for (const c of contractRows) {
    if (!templatesByPlan.has(c.planId)) templatesByPlan.set(c.planId, await tx.select().from(planVisitTemplates).where(eq(planVisitTemplates.planId, c.planId)))
    const dates = windowVisitDates(templatesByPlan.get(c.planId)!, { start: c.termStart, end: c.termEnd }, { workingDays: company.workingDays, closed: new Set(closed) })
    for (const d of dates) windowOf.set(`${c.id}|${d.key}`, { earliest: d.earliest, latest: d.latest, preferred: d.date })
  }
  const siteRows = await tx.select({ id: sites.id, lat: sites.latitude, lon: sites.longitude }).from(sites).where(eq(sites.companyId, company.id))
  const base = companyBase(company)
  const at = new Map(siteRows.map(s => [s.id, { lat: s.lat ?? base.lat, lon: s.lon ?? base.lon }]))
  const planned = rows.flatMap((r) => {
    // generationKey = `${templateId}:${windowKey}:${siteId}`; the window is the template's.
    const w = r.key && r.contractId ? windowOf.get(`${r.contractId}|${r.key.slice(0, r.key.lastIndexOf(':'))}`) : undefined
    if (!w) return []
    const visit: VisitRow = { id: r.id, contractId: r.contractId!, key: r.key!, siteId: r.siteId, customerId: r.customerId, durationMinutes: r.durationMinutes }
    return [{ visit, window: w, ...(at.get(r.siteId) ?? base) }]
  })
  return { planned, closed }
}

function toPlanner(p: Awaited<ReturnType<typeof seasonVisits>>['planned'][number], today: LocalDate | null, pinned: ReadonlyMap<string, string>): PlannerVisit {
  const tech = pinned.get(p.visit.id)
  return {
    id: p.visit.id, windowEarliest: p.window.earliest, windowLatest: p.window.latest, preferred: p.window.preferred,
    durationMinutes: Math.max(1, p.visit.durationMinutes), siteId: p.visit.siteId, customerId: p.visit.customerId, lat: p.lat, lon: p.lon,
    ...(tech && today ? { locked: { day: today, technicianId: tech } } : {}),
  }
}

/** Today's stops for each technician: visits whose window holds today, own territory first, while the day (with driving) stays under TODAY_FILL. */
function pickTodaysStops(planned: Awaited<ReturnType<typeof seasonVisits>>['planned'], first: SeasonPlan, technicians: readonly PlannerTechnician[], today: LocalDate) {
  const techOfCustomer = new Map<string, string>()
  const counts = new Map<string, Map<string, number>>()
  const byId = new Map(planned.map(p => [p.visit.id, p]))
  for (const pl of first.placed) {
    const c = byId.get(pl.visitId)!.visit.customerId
    const m = counts.get(c) ?? new Map<string, number>()
    m.set(pl.technicianId, (m.get(pl.technicianId) ?? 0) + 1)
    counts.set(c, m)
  }
  for (const [c, m] of counts) techOfCustomer.set(c, [...m].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))[0]![0])
  const open = planned.filter(p => p.window.earliest <= today && p.window.latest >= today)
    .sort((a, b) => Math.abs(Date.parse(a.window.preferred) - Date.parse(today)) - Math.abs(Date.parse(b.window.preferred) - Date.parse(today)) || a.visit.id.localeCompare(b.visit.id))
  const pinned = new Map<string, string>()
  const customersToday = new Set<string>()
  const stops = new Map(technicians.map(t => [t.id, [] as Array<{ id: string, durationMinutes: number, lat: number, lon: number }>]))
  const full = new Set<string>()
  // Turn by turn, so each technician gets stops even when today's open windows are few; each
  // takes the nearest-to-preferred stop of their own territory, else anyone's.
  while (full.size < technicians.length) {
    for (const t of technicians) {
      if (full.has(t.id)) continue
      const free = open.filter(p => !pinned.has(p.visit.id) && !customersToday.has(p.visit.customerId))
      const fits = (p: (typeof open)[number]) => dayLoad([...stops.get(t.id)!, { id: p.visit.id, durationMinutes: p.visit.durationMinutes, lat: p.lat, lon: p.lon }], t.home, t.capacityMinutes).totalMinutes <= t.capacityMinutes * TODAY_FILL
      const pick = free.find(p => techOfCustomer.get(p.visit.customerId) === t.id && fits(p)) ?? free.find(fits)
      if (!pick) {
        full.add(t.id)
        continue
      }
      stops.get(t.id)!.push({ id: pick.visit.id, durationMinutes: pick.visit.durationMinutes, lat: pick.lat, lon: pick.lon })
      pinned.set(pick.visit.id, t.id)
      // One visit per customer today (two windows of one customer may both hold today).
      customersToday.add(pick.visit.customerId)
    }
  }
  return pinned
}

/**
 * Plans one season's visits (the scheduled visits of these contracts) and writes each visit's day,
 * start and technician, or the planner's reason when it has no place. Returns who served each customer.
 */
export async function planDemoSeason(tx: Tx, company: DemoPlanningCompany, contractIds: readonly string[], today: LocalDate, previousAssignments: Record<string, string> = {}) {
  if (!contractIds.length) return { assignments: {}, plan: null }
  const technicians = await planningTechnicians(tx, company)
  const { planned, closed } = await seasonVisits(tx, company, contractIds)
  const input = { technicians, closedDays: closed, previousAssignments, dateOrder: 'month-day' as const }
  let plan = planSeason({ ...input, visits: planned.map(p => toPlanner(p, null, new Map())) })
  const weekday = new Date(`${today}T12:00:00Z`).getUTCDay() || 7
  const inSeason = planned.some(p => p.window.earliest <= today && p.window.latest >= today)
  if (inSeason && company.workingDays.includes(weekday) && !closed.includes(today)) {
    const pinned = pickTodaysStops(planned, plan, technicians, today)
    plan = planSeason({ ...input, visits: planned.map(p => toPlanner(p, today, pinned)) })
  }
  const byId = new Map(planned.map(p => [p.visit.id, p]))
  const assignments: Record<string, string> = {}
  for (const pl of plan.placed) {
    assignments[byId.get(pl.visitId)!.visit.customerId] ??= pl.technicianId
    await tx.update(visits).set({ scheduledOn: pl.day, startsAt: localTimeToInstant(pl.day, company.dayStartTime, company.timeZone), technicianId: pl.technicianId, unplacedReason: null })
      .where(eq(visits.id, pl.visitId))
  }
  for (const u of plan.unplaced) {
    await tx.update(visits).set({ technicianId: null, unplacedReason: u.reason }).where(eq(visits.id, u.visitId))
  }
  return { assignments, plan }
}
