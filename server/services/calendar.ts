import { randomBytes } from 'node:crypto'
import { and, asc, eq, gte, isNull, type SQL } from 'drizzle-orm'
import ical, { ICalEventStatus } from 'ical-generator'
import { DateTime } from 'luxon'
import { tzlib_get_ical_block } from 'timezones-ical-library'
import { VISIT_TYPE_LABELS } from '../../shared/types/schedule'
import { addDays, localToday } from '../../shared/utils/company-time'
import { calendarFeeds, companies, customers, sites, visits } from '../db/schema'
import { hashToken, isStaff, type SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'

/** The caller's feeds: a staff member's own, or the customer's. */
function ownerOf(actor: SessionUser) {
  return isStaff(actor) ? { userId: actor.id, customerId: null } : { userId: null, customerId: actor.customerId }
}
function ownerWhere(actor: SessionUser): SQL {
  const o = ownerOf(actor)
  return and(eq(calendarFeeds.companyId, actor.companyId), o.userId ? eq(calendarFeeds.userId, o.userId) : eq(calendarFeeds.customerId, o.customerId!))!
}

export async function myFeed(actor: SessionUser) {
  const [feed] = await useDb().select({ id: calendarFeeds.id, createdAt: calendarFeeds.createdAt }).from(calendarFeeds)
    .where(and(ownerWhere(actor), isNull(calendarFeeds.revokedAt))).limit(1)
  return { feed: feed ?? null }
}

/** A new private feed URL (the previous one stops working). The token is shown this once. */
export async function createFeed(actor: SessionUser, origin: string, ip: string) {
  const token = randomBytes(24).toString('base64url')
  const id = await useDb().transaction(async (tx) => {
    await tx.update(calendarFeeds).set({ revokedAt: new Date() }).where(and(ownerWhere(actor), isNull(calendarFeeds.revokedAt)))
    const [feed] = await tx.insert(calendarFeeds).values({ companyId: actor.companyId, ...ownerOf(actor), tokenHash: hashToken(token) }).returning({ id: calendarFeeds.id })
    await recordAudit(tx, { action: 'calendar_feed.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'calendar_feed', subjectId: feed!.id, ip })
    return feed!.id
  })
  return { id, url: `${origin}/api/calendar/${token}.ics` }
}

export async function revokeFeed(actor: SessionUser, id: string, ip: string) {
  const db = useDb()
  const revoked = await db.update(calendarFeeds).set({ revokedAt: new Date() })
    .where(and(eq(calendarFeeds.id, id), ownerWhere(actor), isNull(calendarFeeds.revokedAt))).returning({ id: calendarFeeds.id })
  if (!revoked.length) throw httpError(404, 'No such calendar feed')
  await recordAudit(db, { action: 'calendar_feed.revoked', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'calendar_feed', subjectId: id, ip })
  return { id, revoked: true }
}

/**
 * The iCalendar (RFC 5545) text of a feed, or null for an unknown or revoked token. Events carry
 * the company's time zone (TZID with its VTIMEZONE); each visit's UID is its id, so it is stable
 * however often the schedule is regenerated; cancelled visits stay in the feed as CANCELLED.
 */
export async function renderFeed(token: string): Promise<string | null> {
  const db = useDb()
  const [feed] = await db.select().from(calendarFeeds).where(and(eq(calendarFeeds.tokenHash, hashToken(token)), isNull(calendarFeeds.revokedAt))).limit(1)
  if (!feed) return null
  const [company] = await db.select().from(companies).where(eq(companies.id, feed.companyId)).limit(1)
  const from = addDays(localToday(company!.timeZone), feed.customerId ? 0 : -30)
  const whose = feed.userId ? eq(visits.technicianId, feed.userId) : eq(visits.customerId, feed.customerId!)
  const rows = await db.select({
    id: visits.id, visitType: visits.visitType, status: visits.status, startsAt: visits.startsAt, durationMinutes: visits.durationMinutes,
    sequence: visits.sequence, updatedAt: visits.updatedAt, statusReason: visits.statusReason,
    customerName: customers.name, siteName: sites.name, line1: sites.line1, city: sites.city, postcode: sites.postcode,
    accessNotes: sites.accessNotes, lat: sites.latitude, lon: sites.longitude,
  }).from(visits).innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
    .where(and(eq(visits.companyId, feed.companyId), whose, gte(visits.scheduledOn, from)))
    .orderBy(asc(visits.startsAt)).limit(1000)

  // No calendar-wide zone: ical-generator would then write DTSTAMP in local time, which RFC 5545
  // forbids (it must be UTC). Events carry TZID, and the zone's VTIMEZONE is added below.
  const cal = ical({ name: `${company!.name} visits`, prodId: { company: 'Rillbook', product: 'Rillbook', language: 'EN' } })
  for (const v of rows) {
    const title = feed.customerId ? `${VISIT_TYPE_LABELS[v.visitType]} — ${company!.name}` : `${VISIT_TYPE_LABELS[v.visitType]}: ${v.customerName}`
    cal.createEvent({
      id: `${v.id}@rillbook`,
      sequence: v.sequence,
      // Start and end as wall-clock times in the company's zone (TZID); stamps in UTC.
      start: DateTime.fromJSDate(v.startsAt, { zone: company!.timeZone }),
      end: DateTime.fromJSDate(v.startsAt, { zone: company!.timeZone }).plus({ minutes: v.durationMinutes }),
      timezone: company!.timeZone,
      stamp: DateTime.fromJSDate(v.updatedAt, { zone: 'utc' }),
      lastModified: DateTime.fromJSDate(v.updatedAt, { zone: 'utc' }),
      summary: v.status === 'cancelled' ? `Cancelled: ${title}` : title,
      location: `${v.line1}, ${v.city} ${v.postcode}`.trim(),
      description: [v.statusReason && `Cancelled: ${v.statusReason}`, !feed.customerId && v.accessNotes && `Access: ${v.accessNotes}`].filter(Boolean).join('\n') || undefined,
      status: v.status === 'cancelled' ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
    })
  }
  const vtimezone = ((tzlib_get_ical_block(company!.timeZone) as string[])[0] ?? '').trim().split(/\r?\n/).join('\r\n')
  const text = cal.toString()
  return vtimezone ? text.replace('BEGIN:VEVENT', `${vtimezone}\r\nBEGIN:VEVENT`) : text
}
