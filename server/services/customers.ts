import { and, asc, count, desc, eq, exists, ilike, isNotNull, isNull, notInArray, or, sql, type SQL } from 'drizzle-orm'
import type { CustomerInput, CustomerUpdateInput } from '../../shared/schemas/customers'
import { contracts, customerContacts, customers, sites, users, waterFeatures } from '../db/schema'
import { isStaff, ownCustomerId, type SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { containsPattern } from '../utils/like'
import { keptForCompany, versionedCache } from '../utils/versioned-cache'
import { recordAudit } from './audit'

// Drizzle leaves column names unqualified in a one-table select, so the correlated subqueries
// name the outer column explicitly.
const outerId = sql`${sql.identifier('customers')}.${sql.identifier('id')}`
const featureCount = sql<number>`(select count(*)::int from ${waterFeatures} wf where wf.customer_id = ${outerId} and wf.archived_at is null)`

const listColumns = {
  id: customers.id, name: customers.name, kind: customers.kind, active: customers.active,
  tags: customers.tags, billingCity: customers.billingCity, archivedAt: customers.archivedAt, createdAt: customers.createdAt,
  features: featureCount,
  primaryEmail: sql<string | null>`(select cc.email from ${customerContacts} cc where cc.customer_id = ${outerId} order by cc.position limit 1)`,
  primaryPhone: sql<string | null>`(select cc.phone from ${customerContacts} cc where cc.customer_id = ${outerId} order by cc.position limit 1)`,
}

/** WHERE conditions that keep a caller inside their tenancy. */
function scope(actor: SessionUser): SQL[] {
  const where: SQL[] = [eq(customers.companyId, actor.companyId)]
  const own = ownCustomerId(actor)
  if (own) where.push(eq(customers.id, own))
  return where
}

export interface CustomerListQuery {
  page: number, pageSize: number, q?: string, sort: 'name' | 'kind' | 'createdAt' | 'features', dir: 'asc' | 'desc'
  status: 'current' | 'archived' | 'all', kind?: CustomerInput['kind'], tag?: string
}

export async function listCustomers(actor: SessionUser, q: CustomerListQuery): Promise<CustomerList> {
  return keptForCompany(customerLists, actor.companyId, ['customers'], `${ownCustomerId(actor) ?? ''}|${JSON.stringify(q)}`, () => buildCustomerList(actor, q))
}

export type CustomerList = Awaited<ReturnType<typeof buildCustomerList>>
/** Pages kept per process until the company's customers, contacts, sites or features change (server/utils/versioned-cache.ts). */
const customerLists = versionedCache<CustomerList>(1000)

async function buildCustomerList(actor: SessionUser, q: CustomerListQuery) {
  const db = useDb()
  const where = scope(actor)
  if (q.status === 'current') where.push(isNull(customers.archivedAt))
  if (q.status === 'archived') where.push(isNotNull(customers.archivedAt))
  if (q.kind) where.push(eq(customers.kind, q.kind))
  if (q.tag) where.push(sql`${q.tag} = any(${customers.tags})`)
  if (q.q) {
    const like = containsPattern(q.q)
    where.push(or(
      ilike(customers.name, like),
      sql`exists (select 1 from unnest(${customers.tags}) t where t ilike ${like})`,
      exists(db.select({ x: sql`1` }).from(customerContacts).where(and(sql`${customerContacts.customerId} = ${outerId}`, or(ilike(customerContacts.email, like), ilike(customerContacts.phone, like), ilike(customerContacts.name, like))))),
      exists(db.select({ x: sql`1` }).from(sites).where(and(sql`${sites.customerId} = ${outerId}`, or(ilike(sites.line1, like), ilike(sites.city, like), ilike(sites.postcode, like))))),
    )!)
  }
  const sortCol = { name: customers.name, kind: customers.kind, createdAt: customers.createdAt, features: featureCount }[q.sort]
  const order = q.dir === 'desc' ? desc(sortCol) : asc(sortCol)
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select(listColumns).from(customers).where(cond).orderBy(order, asc(customers.id))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(customers).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

/** One customer with contacts, sites and features; gate codes only for staff. 404 outside the caller's reach. */
export async function getCustomer(actor: SessionUser, id: string) {
  const db = useDb()
  const [row] = await db.select().from(customers).where(and(eq(customers.id, id), ...scope(actor))).limit(1)
  if (!row) throw httpError(404, 'No such customer')
  const staff = isStaff(actor)
  const [contacts, siteRows, features] = await Promise.all([
    db.select().from(customerContacts).where(eq(customerContacts.customerId, id)).orderBy(asc(customerContacts.position)),
    db.select().from(sites).where(and(eq(sites.customerId, id), staff ? undefined : isNull(sites.archivedAt))).orderBy(asc(sites.name)),
    db.select({
      id: waterFeatures.id, siteId: waterFeatures.siteId, name: waterFeatures.name, kind: waterFeatures.kind,
      computedVolumeL: waterFeatures.computedVolumeL, measuredVolumeL: waterFeatures.measuredVolumeL,
      surfaceAreaM2: waterFeatures.surfaceAreaM2, archivedAt: waterFeatures.archivedAt,
    }).from(waterFeatures).where(and(eq(waterFeatures.customerId, id), staff ? undefined : isNull(waterFeatures.archivedAt))).orderBy(asc(waterFeatures.name)),
  ])
  const { companyId: _c, ...customer } = row
  return {
    ...customer,
    contacts,
    sites: siteRows.map(({ gateCode, companyId: _co, ...s }) => (staff ? { ...s, gateCode } : s)),
    features,
  }
}

/**
 * Replaces a customer's contacts with `contacts`, in order. A contact sent with its id keeps it
 * (and so the portal's link to it); contacts left out are removed.
 */
async function writeContacts(tx: Tx, customerId: string, contacts: CustomerInput['contacts']) {
  const existing = new Set((await tx.select({ id: customerContacts.id }).from(customerContacts).where(eq(customerContacts.customerId, customerId))).map(c => c.id))
  const keep = contacts.flatMap(c => (c.id && existing.has(c.id) ? [c.id] : []))
  await tx.delete(customerContacts).where(and(eq(customerContacts.customerId, customerId), keep.length ? notInArray(customerContacts.id, keep) : undefined))
  for (const [position, c] of contacts.entries()) {
    const values = { name: c.name, email: c.email ?? null, phone: c.phone ?? null, getsReports: c.getsReports, getsInvoices: c.getsInvoices, getsAlerts: c.getsAlerts, position }
    if (c.id && existing.has(c.id)) await tx.update(customerContacts).set(values).where(and(eq(customerContacts.id, c.id), eq(customerContacts.customerId, customerId)))
    else await tx.insert(customerContacts).values({ ...values, customerId })
  }
}

export async function createCustomer(actor: SessionUser, input: CustomerInput, ip: string) {
  const id = await useDb().transaction(async (tx) => {
    const { contacts, ...fields } = input
    const [created] = await tx.insert(customers).values({ ...fields, companyId: actor.companyId }).returning({ id: customers.id })
    await writeContacts(tx, created!.id, contacts)
    await recordAudit(tx, { action: 'customer.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'customer', subjectId: created!.id, ip })
    return created!.id
  })
  return getCustomer(actor, id)
}

export async function updateCustomer(actor: SessionUser, id: string, input: CustomerUpdateInput, ip: string) {
  await getCustomer(actor, id)
  await useDb().transaction(async (tx) => {
    const { contacts, archived, ...fields } = input
    const set = { ...fields, ...(archived !== undefined && { archivedAt: archived ? new Date() : null }) }
    if (Object.keys(set).length) await tx.update(customers).set(set).where(and(eq(customers.id, id), eq(customers.companyId, actor.companyId)))
    if (contacts) await writeContacts(tx, id, contacts)
    await recordAudit(tx, { action: archived === undefined ? 'customer.updated' : archived ? 'customer.archived' : 'customer.restored', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'customer', subjectId: id, ip, detail: { fields: Object.keys(input) } })
  })
  return getCustomer(actor, id)
}

/** Deletes a customer without history; one with sites or sign-ins is archived instead. */
export async function removeCustomer(actor: SessionUser, id: string, ip: string) {
  await getCustomer(actor, id)
  const db = useDb()
  const [[siteCount], [loginCount], [contractCount]] = await Promise.all([
    db.select({ n: count() }).from(sites).where(eq(sites.customerId, id)),
    db.select({ n: count() }).from(users).where(eq(users.customerId, id)),
    db.select({ n: count() }).from(contracts).where(eq(contracts.customerId, id)),
  ])
  const hasHistory = (siteCount?.n ?? 0) > 0 || (loginCount?.n ?? 0) > 0 || (contractCount?.n ?? 0) > 0
  return db.transaction(async (tx) => {
    const base = { companyId: actor.companyId, actorUserId: actor.id, subjectType: 'customer', subjectId: id, ip }
    if (hasHistory) {
      await tx.update(customers).set({ archivedAt: new Date() }).where(and(eq(customers.id, id), eq(customers.companyId, actor.companyId)))
      await recordAudit(tx, { ...base, action: 'customer.archived' })
      return { id, outcome: 'archived' as const }
    }
    await tx.delete(customers).where(and(eq(customers.id, id), eq(customers.companyId, actor.companyId)))
    await recordAudit(tx, { ...base, action: 'customer.deleted' })
    return { id, outcome: 'deleted' as const }
  })
}
