import { and, asc, eq, inArray } from 'drizzle-orm'
import { customerContacts, users } from '../db/schema'
import type { Database, Tx } from '../utils/db'

const FLAG = { reports: customerContacts.getsReports, invoices: customerContacts.getsInvoices, alerts: customerContacts.getsAlerts } as const

/** The e-mail addresses of a customer's contacts who get `what`, first contact first, each once. */
export async function contactEmails(db: Database | Tx, customerId: string, what: keyof typeof FLAG): Promise<string[]> {
  return (await contactEmailsOf(db, [customerId], what)).get(customerId) ?? []
}

/** The same for many customers with one query (batch jobs): customer id → addresses; customers with none are absent. */
export async function contactEmailsOf(db: Database | Tx, customerIds: readonly string[], what: keyof typeof FLAG): Promise<Map<string, string[]>> {
  const out = new Map<string, string[]>()
  if (!customerIds.length) return out
  const rows = await db.select({ customerId: customerContacts.customerId, email: customerContacts.email }).from(customerContacts)
    .where(and(inArray(customerContacts.customerId, [...new Set(customerIds)]), eq(FLAG[what], true))).orderBy(asc(customerContacts.customerId), asc(customerContacts.position))
  for (const r of rows) {
    if (!r.email) continue
    const list = out.get(r.customerId) ?? []
    if (!list.includes(r.email)) list.push(r.email)
    out.set(r.customerId, list)
  }
  return out
}

/** The e-mail addresses of a company's active owners. */
export async function ownerEmails(db: Database | Tx, companyId: string): Promise<string[]> {
  const rows = await db.select({ email: users.email }).from(users).where(and(eq(users.companyId, companyId), eq(users.role, 'owner'), eq(users.active, true)))
  return rows.map(r => r.email)
}
