import { and, asc, eq, inArray, ne, sql } from 'drizzle-orm'
import { localToday } from '../../shared/utils/company-time'
import { orderStops, routeLegs, type RouteCoordinate } from '../../shared/utils/route-order'
import { companies, customers, sites, staffProfiles, users, visits } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { preparedQuery, useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { keptForCompany, versionedCache } from '../utils/versioned-cache'
import { recordAudit } from './audit'
import { readerContext } from './company'
import { featuresForVisits } from './schedule'

/**
 * The driving order is pure but costly for a long day (an exact or heuristic search over the
 * stops), and Today is opened again and again. Orders are kept by their exact inputs (home and
 * each stop's id and place), so an entry cannot be stale: any change is a new key.
 */
const orders = new Map<string, string[]>()
function rememberedOrder(home: RouteCoordinate, stops: Array<{ id: string, lat: number, lon: number }>): string[] {
  const key = `${home.lat},${home.lon}|${stops.map(s => `${s.id}:${s.lat}:${s.lon}`).join(';')}`
  const known = orders.get(key)
  if (known) return [...known]
  const order = orderStops(home, stops)
  if (orders.size >= 20_000) orders.clear()
  orders.set(key, order)
  return [...order]
}

/**
 * More than any one day can hold (a day of at most 24 h of visits of at least 10 minutes each is
 * 144 visits), so no stop of a day is ever left off; the bound only keeps a bad row count out.
 */
const MAX_STOPS = 150

// Today is opened again and again all day: its reads are prepared statements (server/utils/db.ts).
const companyBase = preparedQuery(db => db.select({ baseLatitude: companies.baseLatitude, baseLongitude: companies.baseLongitude })
  .from(companies).where(eq(companies.id, sql.placeholder('companyId'))).limit(1).prepare('today_company_base'))
const technicianOf = preparedQuery(db => db.select({ id: users.id, name: users.name, homeLatitude: staffProfiles.homeLatitude, homeLongitude: staffProfiles.homeLongitude })
  .from(users).leftJoin(staffProfiles, eq(staffProfiles.userId, users.id))
  .where(and(eq(users.id, sql.placeholder('technicianId')), eq(users.companyId, sql.placeholder('companyId')))).limit(1).prepare('today_technician'))
const dayVisits = preparedQuery(db => db.select({
  id: visits.id, status: visits.status, visitType: visits.visitType, durationMinutes: visits.durationMinutes, startsAt: visits.startsAt,
  routePosition: visits.routePosition, contractId: visits.contractId, checklistItems: sql<number>`jsonb_array_length(${visits.checklist})`.mapWith(Number),
  customerId: customers.id, customerName: customers.name,
  siteId: sites.id, siteName: sites.name, line1: sites.line1, city: sites.city, lat: sites.latitude, lon: sites.longitude,
  accessNotes: sites.accessNotes, gateCode: sites.gateCode, hazards: sites.hazards, hazardNotes: sites.hazardNotes,
}).from(visits).innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
  .where(and(eq(visits.companyId, sql.placeholder('companyId')), eq(visits.technicianId, sql.placeholder('technicianId')), eq(visits.scheduledOn, sql.placeholder('date')), ne(visits.status, 'cancelled')))
  .orderBy(asc(visits.startsAt), asc(visits.id)).limit(MAX_STOPS).prepare('today_visits'))

/**
 * A technician's day: their visits in driving order from their home base (or the company's
 * yard), with the leg before each stop, and the expected end time. A hand-made order (route
 * positions) wins over the computed one.
 */
export async function technicianDay(actor: SessionUser, q: { date?: string, technicianId?: string }): Promise<TechnicianDay> {
  const technicianId = actor.role === 'owner' && q.technicianId ? q.technicianId : actor.id
  // The date from the company's time zone (read with the session).
  const { timeZone } = await readerContext(actor)
  const date = q.date ?? localToday(timeZone)
  return keptForCompany(days, actor.companyId, ['schedule', 'customers'], `${technicianId}|${date}|${timeZone}`,
    () => buildTechnicianDay(actor.companyId, technicianId, date, timeZone))
}

export type TechnicianDay = Awaited<ReturnType<typeof buildTechnicianDay>>

/**
 * Days are opened again and again (each technician's, all day long): each is kept per process
 * until the company's visits, staff, contracts' features, customers or sites change
 * (server/utils/versioned-cache.ts), so a warm request reads the two counters only.
 */
const days = versionedCache<TechnicianDay>(2000)

async function buildTechnicianDay(companyId: string, technicianId: string, date: string, timeZone: string) {
  // The company, the technician and the visits load at once.
  const [[company], [tech], rows] = await Promise.all([
    companyBase().execute({ companyId }),
    technicianOf().execute({ technicianId, companyId }),
    dayVisits().execute({ companyId, technicianId, date }),
  ])
  if (!tech) throw httpError(404, 'No such technician')

  const home = tech.homeLatitude != null && tech.homeLongitude != null
    ? { lat: tech.homeLatitude, lon: tech.homeLongitude }
    : company!.baseLatitude != null && company!.baseLongitude != null ? { lat: company!.baseLatitude, lon: company!.baseLongitude } : null
  const located = rows.filter(r => r.lat != null && r.lon != null)
  const handOrdered = rows.some(r => r.routePosition != null)
  let order: string[]
  if (handOrdered) order = [...rows].sort((a, b) => (a.routePosition ?? 999) - (b.routePosition ?? 999)).map(r => r.id)
  else if (home && located.length) order = [...rememberedOrder(home, located.map(r => ({ id: r.id, lat: r.lat!, lon: r.lon! }))), ...rows.filter(r => r.lat == null || r.lon == null).map(r => r.id)]
  else order = rows.map(r => r.id)

  const byId = new Map(rows.map(r => [r.id, r]))
  const ordered = order.map(id => byId.get(id)!)
  const orderedLocated = ordered.filter(r => r.lat != null && r.lon != null).map(r => ({ id: r.id, lat: r.lat!, lon: r.lon! }))
  const legs = home && orderedLocated.length ? routeLegs(home, orderedLocated) : { legs: [], totalKm: 0, totalMinutes: 0 }
  const legById = new Map(legs.legs.map(l => [l.toId, l]))
  const features = await featuresForVisits(rows)

  // Expected times: start of the working day, then each leg's drive and each visit's duration.
  let clock = rows[0]?.startsAt ? new Date(rows[0].startsAt) : null
  const stops = ordered.map((r, i) => {
    const leg = legById.get(r.id) ?? null
    const arrive = clock ? new Date(clock.getTime() + (leg?.minutes ?? 0) * 60_000) : null
    const leave = arrive ? new Date(arrive.getTime() + r.durationMinutes * 60_000) : null
    clock = leave
    return {
      id: r.id, status: r.status, visitType: r.visitType, durationMinutes: r.durationMinutes, startsAt: r.startsAt, routePosition: r.routePosition, contractId: r.contractId,
      customerId: r.customerId, customerName: r.customerName, siteId: r.siteId, siteName: r.siteName, line1: r.line1, city: r.city,
      accessNotes: r.accessNotes, gateCode: r.gateCode, hazards: r.hazards, hazardNotes: r.hazardNotes,
      position: i + 1, latitude: r.lat, longitude: r.lon, checklistItems: r.checklistItems, features: features.get(r.id) ?? [], leg, expectedArrival: arrive, expectedDeparture: leave,
    }
  })
  const workMinutes = rows.reduce((s, r) => s + r.durationMinutes, 0)
  return {
    date, timeZone, technician: { id: tech.id, name: tech.name }, home,
    handOrdered, stops, totalKm: legs.totalKm, driveMinutes: legs.totalMinutes, workMinutes,
    expectedEnd: clock,
  }
}

/** A technician's own order for a day; an empty list goes back to the computed order. */
export async function setRouteOrder(actor: SessionUser, date: string, visitIds: string[], ip: string) {
  const db = useDb()
  if (!visitIds.length) {
    await db.update(visits).set({ routePosition: null })
      .where(and(eq(visits.companyId, actor.companyId), eq(visits.technicianId, actor.id), eq(visits.scheduledOn, date)))
    return technicianDay(actor, { date })
  }
  const mine = await db.select({ id: visits.id }).from(visits)
    .where(and(eq(visits.companyId, actor.companyId), eq(visits.technicianId, actor.id), eq(visits.scheduledOn, date), inArray(visits.id, visitIds)))
  if (mine.length !== new Set(visitIds).size) throw httpError(400, 'Invalid body: visitIds — every visit must be yours on that day', { fields: { visitIds: 'Every visit must be yours on that day' } })
  await db.transaction(async (tx) => {
    for (const [i, id] of visitIds.entries()) await tx.update(visits).set({ routePosition: i + 1 }).where(eq(visits.id, id))
    await recordAudit(tx, { action: 'visit.route_reordered', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'route', subjectId: date, ip, detail: { visitIds } })
  })
  return technicianDay(actor, { date })
}
