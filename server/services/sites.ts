import { and, asc, count, eq, ilike, isNotNull, isNull, or, type SQL } from 'drizzle-orm'
import type { SiteInput, SiteUpdateInput } from '../../shared/schemas/sites'
import { customers, sites, visits, waterFeatures } from '../db/schema'
import { isStaff, ownCustomerId, type SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { containsPattern } from '../utils/like'
import { recordAudit } from './audit'

function scope(actor: SessionUser): SQL[] {
  const where: SQL[] = [eq(sites.companyId, actor.companyId)]
  const own = ownCustomerId(actor)
  if (own) where.push(eq(sites.customerId, own), isNull(sites.archivedAt))
  return where
}

/** Site columns a caller may see: the gate code only for staff. */
function columnsFor(actor: SessionUser) {
  const base = {
    id: sites.id, customerId: sites.customerId, customerName: customers.name, name: sites.name,
    line1: sites.line1, line2: sites.line2, city: sites.city, region: sites.region, postcode: sites.postcode, country: sites.country,
    latitude: sites.latitude, longitude: sites.longitude, altitudeM: sites.altitudeM,
    accessNotes: sites.accessNotes, hazards: sites.hazards, hazardNotes: sites.hazardNotes,
    archivedAt: sites.archivedAt, createdAt: sites.createdAt, updatedAt: sites.updatedAt,
  }
  return isStaff(actor) ? { ...base, gateCode: sites.gateCode } : base
}

export async function listSites(actor: SessionUser, q: { page: number, pageSize: number, q?: string, customerId?: string, status: 'current' | 'archived' | 'all' }) {
  const db = useDb()
  const where = scope(actor)
  if (q.customerId) where.push(eq(sites.customerId, q.customerId))
  if (q.status === 'current') where.push(isNull(sites.archivedAt))
  if (q.status === 'archived') where.push(isNotNull(sites.archivedAt))
  if (q.q) {
    const like = containsPattern(q.q)
    where.push(or(ilike(sites.name, like), ilike(sites.line1, like), ilike(sites.city, like), ilike(sites.postcode, like), ilike(customers.name, like))!)
  }
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select(columnsFor(actor)).from(sites).innerJoin(customers, eq(customers.id, sites.customerId))
      .where(cond).orderBy(asc(customers.name), asc(sites.name)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(sites).innerJoin(customers, eq(customers.id, sites.customerId)).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

export async function getSite(actor: SessionUser, id: string) {
  const [row] = await useDb().select(columnsFor(actor)).from(sites).innerJoin(customers, eq(customers.id, sites.customerId))
    .where(and(eq(sites.id, id), ...scope(actor))).limit(1)
  if (!row) throw httpError(404, 'No such site')
  return row
}

export async function createSite(actor: SessionUser, input: SiteInput, ip: string) {
  const db = useDb()
  const [customer] = await db.select({ id: customers.id }).from(customers)
    .where(and(eq(customers.id, input.customerId), eq(customers.companyId, actor.companyId))).limit(1)
  if (!customer) throw httpError(400, 'Invalid body: customerId — no such customer', { fields: { customerId: 'No such customer' } })
  const id = await db.transaction(async (tx) => {
    const [created] = await tx.insert(sites).values({ ...input, companyId: actor.companyId }).returning({ id: sites.id })
    await recordAudit(tx, { action: 'site.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'site', subjectId: created!.id, ip, detail: { customerId: input.customerId } })
    return created!.id
  })
  return getSite(actor, id)
}

export async function updateSite(actor: SessionUser, id: string, input: SiteUpdateInput, ip: string) {
  const before = await getSite(actor, id)
  const { archived, ...fields } = input
  const lat = 'latitude' in fields ? fields.latitude : before.latitude
  const lng = 'longitude' in fields ? fields.longitude : before.longitude
  if ((lat == null) !== (lng == null)) throw httpError(400, 'Invalid body: longitude — give both latitude and longitude, or neither', { fields: { longitude: 'Give both latitude and longitude, or neither' } })
  await useDb().transaction(async (tx) => {
    const set = { ...fields, ...(archived !== undefined && { archivedAt: archived ? new Date() : null }) }
    if (Object.keys(set).length) await tx.update(sites).set(set).where(and(eq(sites.id, id), eq(sites.companyId, actor.companyId)))
    await recordAudit(tx, { action: archived === undefined ? 'site.updated' : archived ? 'site.archived' : 'site.restored', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'site', subjectId: id, ip, detail: { fields: Object.keys(input) } })
  })
  return getSite(actor, id)
}

/** Deletes a site without features or visits; one with them is archived instead. */
export async function removeSite(actor: SessionUser, id: string, ip: string) {
  await getSite(actor, id)
  const db = useDb()
  const [[features], [siteVisits]] = await Promise.all([
    db.select({ n: count() }).from(waterFeatures).where(eq(waterFeatures.siteId, id)),
    db.select({ n: count() }).from(visits).where(eq(visits.siteId, id)),
  ])
  return db.transaction(async (tx) => {
    const base = { companyId: actor.companyId, actorUserId: actor.id, subjectType: 'site', subjectId: id, ip }
    if ((features?.n ?? 0) > 0 || (siteVisits?.n ?? 0) > 0) {
      await tx.update(sites).set({ archivedAt: new Date() }).where(and(eq(sites.id, id), eq(sites.companyId, actor.companyId)))
      await recordAudit(tx, { ...base, action: 'site.archived' })
      return { id, outcome: 'archived' as const }
    }
    await tx.delete(sites).where(and(eq(sites.id, id), eq(sites.companyId, actor.companyId)))
    await recordAudit(tx, { ...base, action: 'site.deleted' })
    return { id, outcome: 'deleted' as const }
  })
}
