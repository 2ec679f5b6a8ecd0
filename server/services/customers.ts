import { and, asc, count, eq, ilike, type SQL } from 'drizzle-orm'
import { customers } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'

const columns = {
  id: customers.id, name: customers.name, kind: customers.kind,
  email: customers.email, phone: customers.phone, active: customers.active,
}

export async function listCustomers(actor: SessionUser, q: { page: number, pageSize: number, q?: string }) {
  const db = useDb()
  const where: SQL[] = [eq(customers.companyId, actor.companyId)]
  if (q.q) where.push(ilike(customers.name, `%${q.q}%`))
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select(columns).from(customers).where(cond).orderBy(asc(customers.name))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(customers).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

/** The customer record of a signed-in customer: only their own. */
export async function myCustomer(actor: SessionUser) {
  if (!actor.customerId) throw httpError(404, 'This sign-in is not linked to a customer')
  const [row] = await useDb().select(columns).from(customers)
    .where(and(eq(customers.id, actor.customerId), eq(customers.companyId, actor.companyId))).limit(1)
  if (!row) throw httpError(404, 'No such customer')
  return row
}
