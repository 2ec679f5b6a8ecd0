import { and, asc, eq, gte } from 'drizzle-orm'
import type { ClosedDaysInput, CompanyUpdateInput } from '../../shared/schemas/company'
import { localToday } from '../../shared/utils/company-time'
import { closedDays, companies, contracts, users } from '../db/schema'
import type { ReaderContext, SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { notifySessionsChanged } from '../utils/session-cache'
import { recordAudit } from './audit'
import { regenerateContractVisits } from './visit-generation'

const columns = {
  id: companies.id, name: companies.name, currency: companies.currency,
  taxRateBasisPoints: companies.taxRateBasisPoints, unitSystem: companies.unitSystem, timeZone: companies.timeZone,
  workingDays: companies.workingDays, dayStartTime: companies.dayStartTime,
  baseLatitude: companies.baseLatitude, baseLongitude: companies.baseLongitude,
  address: companies.address, phone: companies.phone, billingEmail: companies.billingEmail, paymentTermsDays: companies.paymentTermsDays,
}

/**
 * What a sentence for this person needs from the company: the units they read in (their own
 * choice, else the company's), the company's own units, the number to call (empty: none) and the
 * company's time zone.
 */
export async function readerContext(actor: Pick<SessionUser, 'id' | 'companyId' | 'reader'>): Promise<ReaderContext> {
  // The signed-in user's session lookup already read it (kept current by the session cache's evictions).
  if (actor.reader) return actor.reader
  const [row] = await useDb().select({ companyUnitSystem: companies.unitSystem, own: users.unitSystem, phone: companies.phone, companyName: companies.name, timeZone: companies.timeZone })
    .from(companies).leftJoin(users, and(eq(users.id, actor.id), eq(users.companyId, companies.id))).where(eq(companies.id, actor.companyId)).limit(1)
  if (!row) throw httpError(404, 'No such company')
  return { unitSystem: row.own ?? row.companyUnitSystem, companyUnitSystem: row.companyUnitSystem, phone: row.phone, companyName: row.companyName, timeZone: row.timeZone }
}

/** The units a person reads in, for a schema's messages (a limit quoted in the unit they typed). */
export async function unitSystemOf(actor: Pick<SessionUser, 'id' | 'companyId' | 'reader'>) {
  return (await readerContext(actor)).unitSystem
}

/** The company's settings; `unitSystem` is the one this sign-in reads in (its own choice, else the company's). */
export async function getCompany(actor: SessionUser) {
  const [row] = await useDb().select(columns).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  if (!row) throw httpError(404, 'No such company')
  const [me] = await useDb().select({ unitSystem: users.unitSystem }).from(users).where(eq(users.id, actor.id)).limit(1)
  return { ...row, companyUnitSystem: row.unitSystem, unitSystem: me?.unitSystem ?? row.unitSystem }
}

export async function updateCompany(actor: SessionUser, input: CompanyUpdateInput, ip: string) {
  await useDb().transaction(async (tx) => {
    await tx.update(companies).set(input).where(eq(companies.id, actor.companyId))
    // Units, phone and name travel with every session of the company (session cache, every instance).
    await notifySessionsChanged(tx, { companyId: actor.companyId })
    await recordAudit(tx, { action: 'settings.changed', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'company', subjectId: actor.companyId, ip, detail: input })
    // The working week and start time shape every generated visit: bring future ones in line.
    if (input.workingDays || input.dayStartTime || input.timeZone) await regenerateActiveContracts(tx, actor.companyId)
  })
  return getCompany(actor)
}

async function regenerateActiveContracts(tx: Tx, companyId: string) {
  const active = await tx.select({ id: contracts.id }).from(contracts).where(and(eq(contracts.companyId, companyId), eq(contracts.status, 'active')))
  for (const c of active) await regenerateContractVisits(tx, c.id)
  return active.length
}

export async function listClosedDays(actor: SessionUser) {
  const [company] = await useDb().select({ tz: companies.timeZone }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  const rows = await useDb().select({ day: closedDays.day, reason: closedDays.reason }).from(closedDays)
    .where(and(eq(closedDays.companyId, actor.companyId), gte(closedDays.day, localToday(company!.tz)))).orderBy(asc(closedDays.day)).limit(200)
  return { rows, total: rows.length, page: 1, pageSize: 200 }
}

/** Replaces the upcoming closed days; generated visits move off them. */
export async function replaceClosedDays(actor: SessionUser, input: ClosedDaysInput, ip: string) {
  const [company] = await useDb().select({ tz: companies.timeZone }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  const today = localToday(company!.tz)
  const regenerated = await useDb().transaction(async (tx) => {
    await tx.delete(closedDays).where(and(eq(closedDays.companyId, actor.companyId), gte(closedDays.day, today)))
    const future = input.days.filter(d => d.day >= today)
    if (future.length) await tx.insert(closedDays).values(future.map(d => ({ companyId: actor.companyId, ...d }))).onConflictDoNothing()
    await recordAudit(tx, { action: 'settings.closed_days', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'company', subjectId: actor.companyId, ip, detail: { days: future.map(d => d.day) } })
    return regenerateActiveContracts(tx, actor.companyId)
  })
  return { ...(await listClosedDays(actor)), regeneratedContracts: regenerated }
}
