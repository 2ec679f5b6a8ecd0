import { and, count, eq } from 'drizzle-orm'
import { customers, users } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'

/** The owner's home: real counts of what the company has on record. */
export async function ownerOverview(actor: SessionUser) {
  const db = useDb()
  const [[activeCustomers], staff] = await Promise.all([
    db.select({ n: count() }).from(customers).where(and(eq(customers.companyId, actor.companyId), eq(customers.active, true))),
    db.select({ role: users.role, active: users.active, n: count() }).from(users)
      .where(eq(users.companyId, actor.companyId)).groupBy(users.role, users.active),
  ])
  const activeOf = (role: string) => staff.filter(s => s.role === role && s.active).reduce((a, s) => a + s.n, 0)
  return {
    activeCustomers: activeCustomers?.n ?? 0,
    technicians: activeOf('technician'),
    customerSignIns: activeOf('customer'),
    deactivatedSignIns: staff.filter(s => !s.active).reduce((a, s) => a + s.n, 0),
  }
}
