import { and, asc, count, eq, gte, inArray, isNull, lte, ne, sql, type SQL } from 'drizzle-orm'
import type { StaffProfileInput, VisitUpdateInput } from '../../shared/schemas/visits'
import type { VisitType } from '../../shared/types/schedule'
import { dayLoad, type DayLoad, type DayLoadStop } from '../../shared/utils/day-load'
import { addDays, formatLocalDate, localToday } from '../../shared/utils/company-time'
import { localTimeToInstant } from '../../shared/utils/recurrence'
import { companies, contractFeatures, customers, sites, staffProfiles, users, visits, waterFeatures } from '../db/schema'
import { ownCustomerId, type SessionUser } from '../utils/auth'
import { preparedQuery, useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { releasedWords, takeTechnicianOff } from './technician-days'

const DEFAULT_CAPACITY_MINUTES = 420

/** Staff who can be given visits, with their capacity and home base. */
export async function listTechnicians(actor: SessionUser) {
  return useDb().select({
    id: users.id, name: users.name, role: users.role,
    capacityMinutes: sql<number>`coalesce(${staffProfiles.capacityMinutes}, ${DEFAULT_CAPACITY_MINUTES})`,
    homeLatitude: staffProfiles.homeLatitude, homeLongitude: staffProfiles.homeLongitude,
    /** Their own working weekdays; null: the company's. */
    workingDays: staffProfiles.workingDays,
  }).from(users).leftJoin(staffProfiles, eq(staffProfiles.userId, users.id))
    .where(and(eq(users.companyId, actor.companyId), eq(users.role, 'technician'), eq(users.active, true)))
    .orderBy(asc(users.name)).limit(100)
}

/**
 * Changes a staff member's capacity, home base or own working weekdays. Narrower working days take
 * them off their scheduled visits from today on the weekdays they no longer work (each with the
 * reason, listed in the answer as `unassignedVisits`), as a day off does.
 */
export async function updateStaffProfile(actor: SessionUser, userId: string, input: StaffProfileInput, ip: string) {
  const db = useDb()
  const [u] = await db.select({ id: users.id, name: users.name }).from(users).where(and(eq(users.id, userId), eq(users.companyId, actor.companyId), ne(users.role, 'customer'))).limit(1)
  if (!u) throw httpError(404, 'No such staff member')
  const released = await db.transaction(async (tx) => {
    await tx.insert(staffProfiles).values({ userId, ...input }).onConflictDoUpdate({ target: staffProfiles.userId, set: input })
    let off: Awaited<ReturnType<typeof takeTechnicianOff>> = []
    if (input.workingDays !== undefined) {
      const [company] = await tx.select({ workingDays: companies.workingDays, tz: companies.timeZone }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
      const works = input.workingDays ?? company!.workingDays
      const notWorked = [1, 2, 3, 4, 5, 6, 7].filter(d => !works.includes(d))
      if (notWorked.length) {
        const names = notWorked.map(d => formatLocalDate(addDays('2024-01-01', d - 1), 'longWeekday')).join(', ')
        off = await takeTechnicianOff(tx, actor.companyId, userId,
          and(gte(visits.scheduledOn, localToday(company!.tz)), sql`extract(isodow from ${visits.scheduledOn})::int in (${sql.join(notWorked.map(d => sql`${d}`), sql`, `)})`)!,
          `${u.name} does not work on ${names}: assign someone else or plan these weeks again`)
      }
    }
    await recordAudit(tx, { action: 'staff.profile_changed', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'user', subjectId: userId, ip, detail: { ...input, visitsUnassigned: off.length } })
    return off
  })
  const row = (await listTechnicians(actor)).find(t => t.id === userId) ?? { id: userId, ...input }
  return { ...row, unassignedVisits: released, ...(released.length && { message: releasedWords(u.name, released.length) }) }
}

const visitColumns = {
  id: visits.id, status: visits.status, visitType: visits.visitType, scheduledOn: visits.scheduledOn, startsAt: visits.startsAt,
  durationMinutes: visits.durationMinutes, technicianId: visits.technicianId, technicianName: users.name,
  movedManually: visits.movedManually, moveReason: visits.moveReason, statusReason: visits.statusReason,
  contractId: visits.contractId, customerId: visits.customerId, customerName: customers.name,
  siteId: visits.siteId, siteName: sites.name, siteLine1: sites.line1, siteCity: sites.city,
  siteLatitude: sites.latitude, siteLongitude: sites.longitude,
}

/**
 * dayLoad is pure but costly (the stops' driving order: ~15 ms for 40 stops), and a board asks for
 * every technician-day of its range on each load. Its answers are kept by their exact inputs, so
 * an entry can never be stale: a moved, added or re-timed stop, or a new home, is a new key.
 */
const dayLoads = new Map<string, DayLoad>()
function rememberedDayLoad(stops: DayLoadStop[], home: { lat: number, lon: number } | null, capacityMinutes: number): DayLoad {
  const key = `${home ? `${home.lat},${home.lon}` : '-'}|${capacityMinutes}|${stops.map(s => `${s.id}:${s.durationMinutes}:${s.lat}:${s.lon}`).join(';')}`
  const known = dayLoads.get(key)
  if (known) return { ...known }
  const load = dayLoad(stops, home, capacityMinutes)
  if (dayLoads.size >= 20_000) dayLoads.clear()
  dayLoads.set(key, load)
  return { ...load }
}

/** Visits between two dates for the week and month boards, with each technician's load per day (driving included). */
export async function board(actor: SessionUser, q: { from: string, to: string, technicianId?: string, visitType?: VisitType, includeCancelled: boolean }) {
  const db = useDb()
  const where: SQL[] = [eq(visits.companyId, actor.companyId), gte(visits.scheduledOn, q.from), lte(visits.scheduledOn, q.to)]
  if (!q.includeCancelled) where.push(ne(visits.status, 'cancelled'))
  if (q.technicianId === 'unassigned') where.push(isNull(visits.technicianId))
  else if (q.technicianId) where.push(eq(visits.technicianId, q.technicianId))
  if (q.visitType) where.push(eq(visits.visitType, q.visitType))
  const [rows, technicians] = await Promise.all([
    db.select(visitColumns).from(visits)
      .innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
      .leftJoin(users, eq(users.id, visits.technicianId))
      .where(and(...where)).orderBy(asc(visits.scheduledOn), asc(customers.name)).limit(2000),
    listTechnicians(actor),
  ])
  // Each technician-day: visit time plus driving between its stops (shared/utils/day-load, the
  // numbers the board shows), against the technician's capacity. Cancelled and skipped visits take no time.
  const stopsOf = new Map<string, Map<string, DayLoadStop[]>>()
  for (const v of rows) {
    if (!v.technicianId || v.status === 'cancelled' || v.status === 'skipped') continue
    const day = stopsOf.get(v.scheduledOn) ?? new Map<string, DayLoadStop[]>()
    stopsOf.set(v.scheduledOn, day.set(v.technicianId, [...(day.get(v.technicianId) ?? []), { id: v.id, durationMinutes: v.durationMinutes, lat: v.siteLatitude, lon: v.siteLongitude }]))
  }
  const techById = new Map(technicians.map(t => [t.id, t]))
  const load: Record<string, Record<string, DayLoad>> = {}
  for (const [day, perTech] of stopsOf) {
    load[day] = {}
    for (const [tid, stops] of perTech) {
      const t = techById.get(tid)
      const home = t?.homeLatitude != null && t.homeLongitude != null ? { lat: t.homeLatitude, lon: t.homeLongitude } : null
      load[day][tid] = rememberedDayLoad(stops, home, t?.capacityMinutes ?? DEFAULT_CAPACITY_MINUTES)
    }
  }
  return { from: q.from, to: q.to, visits: rows, technicians, load, unassigned: rows.filter(v => !v.technicianId && v.status === 'scheduled').length }
}

export async function getVisit(actor: SessionUser, id: string) {
  const db = useDb()
  const own = ownCustomerId(actor)
  const [v] = await db.select({ ...visitColumns, checklist: visits.checklist, startedAt: visits.startedAt, finishedAt: visits.finishedAt })
    .from(visits).innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
    .leftJoin(users, eq(users.id, visits.technicianId))
    .where(and(eq(visits.id, id), eq(visits.companyId, actor.companyId), own ? eq(visits.customerId, own) : undefined)).limit(1)
  if (!v) throw httpError(404, 'No such visit')
  return v
}

/** Assigns a technician or moves a visit (with a reason); either marks it moved by hand, so regeneration and the planner leave it alone. */
export async function updateVisit(actor: SessionUser, id: string, input: VisitUpdateInput, ip: string) {
  const before = await getVisit(actor, id)
  if (['done', 'cancelled'].includes(before.status)) throw httpError(409, `This visit is ${before.status} and cannot change`)
  const db = useDb()
  if (input.technicianId) {
    const [tech] = await db.select({ id: users.id }).from(users)
      .where(and(eq(users.id, input.technicianId), eq(users.companyId, actor.companyId), inArray(users.role, ['technician', 'owner']), eq(users.active, true))).limit(1)
    if (!tech) throw httpError(400, 'Invalid body: technicianId — no such active technician', { fields: { technicianId: 'No such active technician' } })
  }
  await db.transaction(async (tx) => {
    const set: Partial<typeof visits.$inferInsert> = {}
    // Assigned or moved by hand: the planner keeps it where the owner put it, and its "could not place" reason is over.
    if (input.technicianId !== undefined && input.technicianId !== before.technicianId) Object.assign(set, { technicianId: input.technicianId, movedManually: true, unplacedReason: null })
    if (input.durationMinutes !== undefined) set.durationMinutes = input.durationMinutes
    if (input.scheduledOn && input.scheduledOn !== before.scheduledOn) {
      const [company] = await tx.select({ tz: companies.timeZone, start: companies.dayStartTime }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
      Object.assign(set, { scheduledOn: input.scheduledOn, startsAt: localTimeToInstant(input.scheduledOn, company!.start, company!.tz), movedManually: true, unplacedReason: null, moveReason: input.moveReason ?? '', routePosition: null })
    }
    await tx.update(visits).set({ ...set, sequence: sql`${visits.sequence} + 1` }).where(eq(visits.id, id))
    await recordAudit(tx, {
      action: set.scheduledOn ? 'visit.moved' : 'visit.assigned', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'visit', subjectId: id, ip,
      detail: { ...input, fromDate: before.scheduledOn, fromTechnician: before.technicianId },
    })
  })
  return getVisit(actor, id)
}

const contractFeatureNames = preparedQuery(db => db.select({ contractId: contractFeatures.contractId, siteId: waterFeatures.siteId, name: waterFeatures.name })
  .from(contractFeatures).innerJoin(waterFeatures, eq(waterFeatures.id, contractFeatures.featureId))
  .where(sql`${contractFeatures.contractId} = any(${sql.placeholder('contractIds')}::uuid[])`).prepare('contract_feature_names'))

/** Names of the water features a visit covers (its contract's features at its site). */
export async function featuresForVisits(visitRows: Array<{ id: string, contractId: string | null, siteId: string }>) {
  const contractIds = [...new Set(visitRows.flatMap(v => (v.contractId ? [v.contractId] : [])))]
  if (!contractIds.length) return new Map<string, string[]>()
  const rows = await contractFeatureNames().execute({ contractIds })
  return new Map(visitRows.map(v => [v.id, rows.filter(r => r.contractId === v.contractId && r.siteId === v.siteId).map(r => r.name)]))
}

/** Paged visits, newest last; for a customer only their own. `upcoming` leaves out past and cancelled ones. */
export async function listVisits(actor: SessionUser, q: { page: number, pageSize: number, customerId?: string, contractId?: string, from?: string, upcoming: boolean }) {
  const db = useDb()
  const where: SQL[] = [eq(visits.companyId, actor.companyId)]
  const own = ownCustomerId(actor)
  if (own) where.push(eq(visits.customerId, own))
  else if (q.customerId) where.push(eq(visits.customerId, q.customerId))
  if (q.contractId) where.push(eq(visits.contractId, q.contractId))
  if (q.upcoming) {
    const [company] = await db.select({ tz: companies.timeZone }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
    where.push(gte(visits.scheduledOn, q.from ?? localToday(company!.tz)), inArray(visits.status, ['scheduled', 'in_progress']))
  }
  else if (q.from) where.push(gte(visits.scheduledOn, q.from))
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select(visitColumns).from(visits)
      .innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
      .leftJoin(users, eq(users.id, visits.technicianId))
      .where(cond).orderBy(asc(visits.scheduledOn), asc(visits.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(visits).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}
