// A technician's dated days off (holiday, training, sick). The planner never puts a visit on one.
// Adding a day off over days that already hold that technician's scheduled visits takes the
// technician off those visits, each with an unplaced reason, and answers with the list: they show
// in the board's tray and "plan these weeks again" places them with someone who is working.
import { and, asc, eq, gte, inArray, lte, sql, type SQL } from 'drizzle-orm'
import type { DayOffInput } from '../../shared/schemas/technician-days'
import { addDays, formatLocalDate, type LocalDate } from '../../shared/utils/company-time'
import { customers, technicianDaysOff, users, visits } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'

const dayOffColumns = { id: technicianDaysOff.id, from: technicianDaysOff.fromDay, to: technicianDaysOff.toDay, reason: technicianDaysOff.reason }

async function ownTechnician(db: Tx | ReturnType<typeof useDb>, actor: SessionUser, userId: string) {
  const [u] = await db.select({ id: users.id, name: users.name }).from(users)
    .where(and(eq(users.id, userId), eq(users.companyId, actor.companyId), eq(users.role, 'technician'))).limit(1)
  if (!u) throw httpError(404, 'No such technician')
  return u
}

/** The technician's days off, earliest first. */
export async function listDaysOff(actor: SessionUser, userId: string) {
  const db = useDb()
  await ownTechnician(db, actor, userId)
  const rows = await db.select(dayOffColumns).from(technicianDaysOff)
    .where(and(eq(technicianDaysOff.userId, userId), eq(technicianDaysOff.companyId, actor.companyId)))
    .orderBy(asc(technicianDaysOff.fromDay)).limit(500)
  return { rows }
}

/** "13 Apr" or "13 Apr – 17 Apr". */
function spanWords(from: LocalDate, to: LocalDate) {
  return from === to ? formatLocalDate(from, 'monthDay') : `${formatLocalDate(from, 'monthDay')} – ${formatLocalDate(to, 'monthDay')}`
}

/** Records a day off; the technician's scheduled visits on those days lose their technician, with the reason, and are listed. */
export async function addDayOff(actor: SessionUser, userId: string, input: DayOffInput, ip: string) {
  const to = input.to ?? input.from
  return useDb().transaction(async (tx) => {
    const tech = await ownTechnician(tx, actor, userId)
    const [dayOff] = await tx.insert(technicianDaysOff)
      .values({ companyId: actor.companyId, userId, fromDay: input.from, toDay: to, reason: input.reason })
      .returning(dayOffColumns)
    const affected = await takeTechnicianOff(tx, actor.companyId, userId, and(gte(visits.scheduledOn, input.from), lte(visits.scheduledOn, to))!,
      `${tech.name} is off (${input.reason}) on ${spanWords(input.from, to)}: assign someone else or plan these weeks again`)
    await recordAudit(tx, {
      action: 'staff.day_off_added', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'user', subjectId: userId, ip,
      detail: { from: input.from, to, reason: input.reason, visitsUnassigned: affected.length },
    })
    return { dayOff: dayOff!, unassignedVisits: affected, message: releasedWords(tech.name, affected.length) }
  })
}

/** What the answer says about the visits a change took the technician off. */
export function releasedWords(name: string, n: number) {
  return n
    ? `${n} ${n === 1 ? 'visit was' : 'visits were'} on those days: ${name} is off them now and they wait with the visits still to place.`
    : `No visits of ${name} on those days.`
}

/**
 * Takes the technician off their scheduled visits that `when` picks, each with the reason (shown
 * with the visits still to place), and lists them.
 */
export async function takeTechnicianOff(tx: Tx, companyId: string, userId: string, when: SQL, unplacedReason: string) {
  const affected = await tx.select({ id: visits.id, scheduledOn: visits.scheduledOn, customerName: customers.name })
    .from(visits).innerJoin(customers, eq(customers.id, visits.customerId))
    .where(and(eq(visits.companyId, companyId), eq(visits.technicianId, userId), eq(visits.status, 'scheduled'), when))
    .orderBy(asc(visits.scheduledOn), asc(customers.name))
  if (affected.length) {
    await tx.update(visits).set({ technicianId: null, unplacedReason, sequence: sql`${visits.sequence} + 1` })
      .where(and(eq(visits.companyId, companyId), inArray(visits.id, affected.map(v => v.id))))
  }
  return affected
}

/** Removes a day off. Visits taken off the technician stay in the tray: the owner places them again. */
export async function removeDayOff(actor: SessionUser, userId: string, dayOffId: string, ip: string) {
  return useDb().transaction(async (tx) => {
    await ownTechnician(tx, actor, userId)
    const [gone] = await tx.delete(technicianDaysOff)
      .where(and(eq(technicianDaysOff.id, dayOffId), eq(technicianDaysOff.userId, userId), eq(technicianDaysOff.companyId, actor.companyId)))
      .returning(dayOffColumns)
    if (!gone) throw httpError(404, 'No such day off')
    await recordAudit(tx, { action: 'staff.day_off_removed', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'user', subjectId: userId, ip, detail: gone })
    return { removed: gone }
  })
}

/** Every day off of the company's technicians, one date per day, by technician (for the planner). */
export async function daysOffByTechnician(tx: Tx, companyId: string): Promise<Map<string, LocalDate[]>> {
  const rows = await tx.select({ userId: technicianDaysOff.userId, from: technicianDaysOff.fromDay, to: technicianDaysOff.toDay })
    .from(technicianDaysOff).where(eq(technicianDaysOff.companyId, companyId))
  const out = new Map<string, LocalDate[]>()
  for (const r of rows) {
    const days = out.get(r.userId) ?? []
    for (let d = r.from; d <= r.to; d = addDays(d, 1)) days.push(d)
    out.set(r.userId, days)
  }
  return out
}
