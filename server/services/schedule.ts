import { and, asc, count, eq, gte, inArray, isNull, lte, ne, sql, type SQL } from 'drizzle-orm'
import type { z } from 'zod'
import { dayLoad, type DayLoad } from '../../shared/utils/day-load'
import { BOARD_VISIT_LIMIT, type boardQuery, type StaffProfileInput, type VisitUpdateInput } from '../../shared/schemas/visits'
import { addDays, formatLocalDate, localToday } from '../../shared/utils/company-time'
import { localTimeToInstant } from '../../shared/utils/recurrence'
import { companies, contractFeatures, customers, sites, staffProfiles, technicianDayLoads as technicianDayLoadsTable, users, visits, waterFeatures } from '../db/schema'
import { ownCustomerId, type SessionUser } from '../utils/auth'
import { preparedQuery, useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { keptForCompany, versionedCache } from '../utils/versioned-cache'
import { releasedWords, takeTechnicianOff } from './technician-days'

const DEFAULT_CAPACITY_MINUTES = 420
type BoardQuery = z.output<typeof boardQuery>

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

export interface TechnicianDayLoad extends DayLoad {
  /** Visits that count for the day: assigned, not cancelled or skipped. */
  visits: number
}

/**
 * Each technician-day's load between two dates, from technician_day_loads (kept by triggers).
 * Days whose driving the triggers cleared are computed here with shared/utils/day-load.ts from
 * their stops, read in one statement with the version they belong to, and stored for that version
 * only (a change meanwhile took a new version and stays to be computed). Capacity is read live.
 */
async function technicianDayLoads(companyId: string, from: string, to: string, capacityOf: (technicianId: string) => number) {
  const db = useDb()
  const rows = await db.select().from(technicianDayLoadsTable)
    .where(and(eq(technicianDayLoadsTable.companyId, companyId), gte(technicianDayLoadsTable.day, from), lte(technicianDayLoadsTable.day, to)))
  const figures = new Map(rows.map(r => [`${r.day}|${r.technicianId}`, r]))
  if (rows.some(r => r.drivingMinutes == null)) {
    type Stop = { id: string, durationMinutes: number, lat: number | null, lon: number | null, technicianId: string, day: string, version: string, homeLat: number | null, homeLon: number | null }
    const { rows: stale } = await db.execute<Stop>(sql`
      select l.technician_id as "technicianId", l.day::text as day, l.version::text as version, v.id, v.duration_minutes as "durationMinutes",
        s.latitude as lat, s.longitude as lon, sp.home_latitude as "homeLat", sp.home_longitude as "homeLon"
      from technician_day_loads l
      join visits v on v.company_id = l.company_id and v.technician_id = l.technician_id and v.scheduled_on = l.day and v.status not in ('cancelled', 'skipped')
      join sites s on s.id = v.site_id
      left join staff_profiles sp on sp.user_id = l.technician_id
      where l.company_id = ${companyId} and l.day between ${from} and ${to} and l.driving_minutes is null
      order by l.day, l.technician_id, v.id`)
    for (const r of rows) if (r.drivingMinutes == null) figures.delete(`${r.day}|${r.technicianId}`)
    const days = new Map<string, Stop[]>()
    for (const s of stale) {
      const key = `${s.day}|${s.technicianId}`
      days.set(key, [...(days.get(key) ?? []), s])
    }
    const computed = [...days.values()].map((stops) => {
      const first = stops[0]!
      const start = first.homeLat != null && first.homeLon != null ? { lat: first.homeLat, lon: first.homeLon } : null
      const load = dayLoad(stops, start, capacityOf(first.technicianId))
      figures.set(`${first.day}|${first.technicianId}`, {
        companyId, technicianId: first.technicianId, day: first.day, visits: stops.length, visitMinutes: load.visitMinutes,
        drivingMinutes: load.drivingMinutes, stopsWithoutPlace: load.stopsWithoutPlace, version: Number(first.version),
      })
      return { technician_id: first.technicianId, day: first.day, version: first.version, driving: load.drivingMinutes, without: load.stopsWithoutPlace }
    })
    if (computed.length) {
      await db.execute(sql`
        update technician_day_loads t set driving_minutes = x.driving, stops_without_place = x.without
        from jsonb_to_recordset(${JSON.stringify(computed)}::jsonb) as x(technician_id uuid, day date, version bigint, driving double precision, without integer)
        where t.company_id = ${companyId} and t.technician_id = x.technician_id and t.day = x.day and t.version = x.version`)
    }
  }
  const load: Record<string, Record<string, TechnicianDayLoad>> = {}
  for (const r of [...figures.values()].sort((a, b) => a.day.localeCompare(b.day))) {
    const capacityMinutes = capacityOf(r.technicianId)
    const drivingMinutes = r.drivingMinutes ?? 0
    const totalMinutes = r.visitMinutes + drivingMinutes
    ;(load[r.day] ??= {})[r.technicianId] = {
      visits: r.visits, visitMinutes: r.visitMinutes, drivingMinutes, totalMinutes, capacityMinutes,
      over: totalMinutes > capacityMinutes, stopsWithoutPlace: r.stopsWithoutPlace ?? 0,
    }
  }
  return load
}

/**
 * The week and month boards: each technician-day's load between two dates (visit time and
 * driving against capacity, every technician, whatever is filtered), and the visit cards of the
 * range, or of the technician or day picked in it, when they are at most BOARD_VISIT_LIMIT.
 * With more, `visits` is empty and `tooMany` says so: never a cut list.
 */
export async function board(actor: SessionUser, q: BoardQuery): Promise<Board> {
  return keptForCompany(boards, actor.companyId, ['schedule', 'customers'], JSON.stringify(q), () => buildBoard(actor, q))
}

export type Board = Awaited<ReturnType<typeof buildBoard>>

/**
 * Boards are kept per process until the company's visits, staff, customers or sites change
 * (server/utils/versioned-cache.ts); the day loads they show follow the same rows. Weighed by
 * their visit cards, so a few month boards cannot hold the process's memory.
 */
const boards = versionedCache<Board>(500, { weigh: b => 1 + b.visits.length, maxWeight: 200_000 })

async function buildBoard(actor: SessionUser, q: BoardQuery) {
  const db = useDb()
  const where: SQL[] = [eq(visits.companyId, actor.companyId), gte(visits.scheduledOn, q.from), lte(visits.scheduledOn, q.to)]
  if (!q.includeCancelled) where.push(ne(visits.status, 'cancelled'))
  if (q.visitType) where.push(eq(visits.visitType, q.visitType))
  // The technician picked (or nobody), as before; the day picked narrows the cards only.
  const ofTechnician = q.technicianId === 'unassigned' ? isNull(visits.technicianId) : q.technicianId ? eq(visits.technicianId, q.technicianId) : sql`true`
  const pick = and(ofTechnician, q.day ? eq(visits.scheduledOn, q.day) : undefined)!
  const hasPick = !!q.technicianId || !!q.day
  const base = and(...where)!
  // Counting stops one past the limit: over the company-and-date index alone that reads at most
  // that many index entries (when cancelled visits are included), however full the range is.
  const upTo = (cond: SQL) => sql`(select count(*)::int from (select 1 from ${visits} where ${cond} limit ${BOARD_VISIT_LIMIT + 1}) x)`
  const countUpTo = async (cond: SQL) => (await db.execute<{ n: number }>(sql`select ${upTo(cond)} as n`)).rows[0]?.n ?? 0
  const [technicians, { rows: [counted] }] = await Promise.all([
    listTechnicians(actor),
    // In one statement: the range's visits up to the limit, and the unassigned ones (found
    // through the technician-and-date index, technician_id is null).
    db.execute<{ inRange: number, unassigned: number }>(sql`select ${upTo(base)} as "inRange",
      (select count(*)::int from ${visits} where ${and(base, ofTechnician, isNull(visits.technicianId), eq(visits.status, 'scheduled'))}) as unassigned`),
  ])
  // A technician picked who is not among the active technicians listed: still this company's staff?
  if (q.technicianId && q.technicianId !== 'unassigned' && !technicians.some(t => t.id === q.technicianId)) {
    const [staff] = await db.select({ id: users.id }).from(users)
      .where(and(eq(users.id, q.technicianId), eq(users.companyId, actor.companyId), ne(users.role, 'customer'))).limit(1)
    if (!staff) throw httpError(404, 'No such technician')
  }
  const inRange = counted?.inRange ?? 0
  const large = inRange > BOARD_VISIT_LIMIT
  const tooMany = large && (!hasPick || (await countUpTo(and(base, pick)!)) > BOARD_VISIT_LIMIT)
  const techById = new Map(technicians.map(t => [t.id, t]))
  const [rows, load] = await Promise.all([
    tooMany
      ? Promise.resolve([])
      : db.select(visitColumns).from(visits)
          .innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
          .leftJoin(users, eq(users.id, visits.technicianId))
          .where(and(base, pick)).orderBy(asc(visits.scheduledOn), asc(customers.name), asc(visits.id)),
    technicianDayLoads(actor.companyId, q.from, q.to, tid => techById.get(tid)?.capacityMinutes ?? DEFAULT_CAPACITY_MINUTES),
  ])
  return {
    from: q.from, to: q.to, day: q.day ?? null, visits: rows, technicians, load,
    /** Every visit of the pick (or the range), never cut; null when there are more than BOARD_VISIT_LIMIT. */
    visitCount: tooMany ? null : rows.length,
    /** The range holds more visits than one answer carries: the page leads with the load overview. */
    large,
    tooMany: tooMany ? { limit: BOARD_VISIT_LIMIT } : null,
    unassigned: counted?.unassigned ?? 0,
  }
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
