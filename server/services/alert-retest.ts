// A retest visit booked from an alert in one click: at the feature's site, on the company's next
// working day (its working week and closed days), by the technician who last visited the site.
import { and, asc, desc, eq, gte, ne, sql } from 'drizzle-orm'
import { localTimeToInstant, nearestWorkingDay } from '../../shared/utils/recurrence'
import { addDays, localToday } from '../../shared/utils/company-time'
import { alerts, closedDays, companies, users, visits, waterFeatures } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { deepestAtSite, withSafety } from './visit-safety'

/** How far ahead a retest may land when the next days are closed (common practice, no source). */
const RETEST_WITHIN_DAYS = 14
const RETEST_MINUTES = 30

const visitColumns = { id: visits.id, scheduledOn: visits.scheduledOn, startsAt: visits.startsAt, technicianId: visits.technicianId, siteId: visits.siteId, visitType: visits.visitType, status: visits.status }

/**
 * Books (or, when one was booked already, returns) the retest visit of an alert about a water
 * feature. The alert row is locked while booking, so two clicks at once book one visit.
 */
export async function bookRetest(actor: SessionUser, alertId: string, ip: string, clock: { now?: Date } = {}) {
  return useDb().transaction(async (tx) => {
    const [a] = await tx.select().from(alerts).where(and(eq(alerts.id, alertId), eq(alerts.companyId, actor.companyId))).for('update').limit(1)
    if (!a) throw httpError(404, 'No such alert')
    if (a.retestVisitId) {
      const [booked] = await tx.select(visitColumns).from(visits).where(and(eq(visits.id, a.retestVisitId), ne(visits.status, 'cancelled'))).limit(1)
      if (booked) return { created: false, alertId, visit: booked }
    }
    if (!a.featureId) throw httpError(409, 'This alert is not about a water feature: there is nothing to retest')
    if (a.status === 'resolved') throw httpError(409, 'This alert is resolved')
    const [f] = await tx.select({ name: waterFeatures.name, siteId: waterFeatures.siteId, customerId: waterFeatures.customerId }).from(waterFeatures).where(eq(waterFeatures.id, a.featureId)).limit(1)
    if (!f) throw httpError(404, 'No such water feature')
    const [company] = await tx.select({ tz: companies.timeZone, workingDays: companies.workingDays, start: companies.dayStartTime, latitude: companies.baseLatitude }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
    const tomorrow = addDays(localToday(company!.tz, clock.now), 1)
    const last = addDays(tomorrow, RETEST_WITHIN_DAYS)
    const closed = await tx.select({ day: closedDays.day }).from(closedDays).where(and(eq(closedDays.companyId, actor.companyId), gte(closedDays.day, tomorrow))).orderBy(asc(closedDays.day))
    const day = nearestWorkingDay(tomorrow, { workingDays: company!.workingDays, closed: new Set(closed.map(c => c.day)) }, { from: tomorrow, to: last })
    if (!day) throw httpError(409, `No working day in the next ${RETEST_WITHIN_DAYS} days: check the working week and closed days in the company settings`)
    const [tech] = await tx.select({ id: users.id }).from(visits).innerJoin(users, eq(users.id, visits.technicianId))
      .where(and(eq(visits.siteId, f.siteId), eq(users.active, true), sql`${visits.technicianId} is not null`)).orderBy(desc(visits.scheduledOn)).limit(1)
    const [v] = await tx.insert(visits).values({
      companyId: actor.companyId, customerId: f.customerId, siteId: f.siteId, visitType: 'water_test', scheduledOn: day,
      startsAt: localTimeToInstant(day, company!.start, company!.tz), durationMinutes: RETEST_MINUTES, technicianId: tech?.id ?? null, movedManually: true,
      checklist: withSafety([`Retest the water of ${f.name}`, 'Compare with the alert and tell the customer'], { visitType: 'water_test', date: day, deepestM: await deepestAtSite(tx, f.siteId), latitude: company!.latitude, treatment: true }),
      internalNotes: `Retest booked from the alert: ${a.title}`.slice(0, 4000),
    }).returning(visitColumns)
    await tx.update(alerts).set({ retestVisitId: v!.id, ...(a.status === 'open' && { status: 'acknowledged' as const }) }).where(eq(alerts.id, a.id))
    await recordAudit(tx, { action: 'alert.retest_booked', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'alert', subjectId: a.id, ip, detail: { visitId: v!.id, day } })
    return { created: true, alertId, visit: v! }
  })
}
