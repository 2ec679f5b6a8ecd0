import { and, asc, eq } from 'drizzle-orm'
import { customerContacts, users } from '../db/schema'
import type { Database, Tx } from '../utils/db'

const FLAG = { reports: customerContacts.getsReports, invoices: customerContacts.getsInvoices, alerts: customerContacts.getsAlerts } as const

/** The e-mail addresses of a customer's contacts who get `what`, first contact first, each once. */
export async function contactEmails(db: Database | Tx, customerId: string, what: keyof typeof FLAG): Promise<string[]> {
  const rows = await db.select({ email: customerContacts.email }).from(customerContacts)
    .where(and(eq(customerContacts.customerId, customerId), eq(FLAG[what], true))).orderBy(asc(customerContacts.position))
  return [...new Set(rows.flatMap(r => (r.email ? [r.email] : [])))]
}

/** The e-mail addresses of a company's active owners. */
export async function ownerEmails(db: Database | Tx, companyId: string): Promise<string[]> {
  const rows = await db.select({ email: users.email }).from(users).where(and(eq(users.companyId, companyId), eq(users.role, 'owner'), eq(users.active, true)))
  return rows.map(r => r.email)
}
