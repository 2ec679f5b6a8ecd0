import { and, count, desc, eq, isNotNull } from 'drizzle-orm'
import { customers, invoices, users } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'

/** The owner's home: real counts of what the company has on record. */
export async function ownerOverview(actor: SessionUser) {
  const db = useDb()
  const [[activeCustomers], staff, paymentsToCheck] = await Promise.all([
    db.select({ n: count() }).from(customers).where(and(eq(customers.companyId, actor.companyId), eq(customers.active, true))),
    db.select({ role: users.role, active: users.active, n: count() }).from(users)
      .where(eq(users.companyId, actor.companyId)).groupBy(users.role, users.active),
    // Open invoices whose online payment did not match what was due: the owner resolves each.
    db.select({ id: invoices.id, number: invoices.number, customerName: customers.name, currency: invoices.currency, mismatch: invoices.paymentMismatch })
      .from(invoices).innerJoin(customers, eq(customers.id, invoices.customerId))
      .where(and(eq(invoices.companyId, actor.companyId), eq(invoices.status, 'due'), isNotNull(invoices.paymentMismatch)))
      .orderBy(desc(invoices.updatedAt)).limit(20),
  ])
  const activeOf = (role: string) => staff.filter(s => s.role === role && s.active).reduce((a, s) => a + s.n, 0)
  return {
    activeCustomers: activeCustomers?.n ?? 0,
    technicians: activeOf('technician'),
    customerSignIns: activeOf('customer'),
    deactivatedSignIns: staff.filter(s => !s.active).reduce((a, s) => a + s.n, 0),
    paymentsToCheck: paymentsToCheck.map(p => ({ id: p.id, number: p.number, customerName: p.customerName, currency: p.currency, mismatch: p.mismatch! })),
  }
}
