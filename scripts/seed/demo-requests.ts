// Demo service requests waiting in the owner's inbox (invented), so the requests screen has work.
import { addDays, localToday } from '../../shared/utils/company-time'
import { companies, serviceRequests } from '../../server/db/schema'
import type { Tx } from '../../server/utils/db'
import { eq } from 'drizzle-orm'

export async function seedRequests(tx: Tx, companyId: string, demoId: (key: string) => string) {
  const [company] = await tx.select({ timeZone: companies.timeZone }).from(companies).where(eq(companies.id, companyId)).limit(1)
  const today = localToday(company!.timeZone)
  const rows = [
    { key: 'request-brannock-green', customerKey: 'customer-brannock', kind: 'green_water' as const, preferredDates: [addDays(today, 2), addDays(today, 3)], description: 'The water turned pea green over the last week and we cannot see the fish any more. The UV light is on.' },
    { key: 'request-feldspar-pump', customerKey: 'customer-feldspar', kind: 'equipment_fault' as const, preferredDates: [addDays(today, 1)], description: 'The waterfall pump hums but no water comes out. We unplugged it for now.' },
  ]
  let added = 0
  for (const r of rows) {
    added += (await tx.insert(serviceRequests).values({
      id: demoId(r.key), companyId, customerId: demoId(r.customerKey), siteId: demoId(`site-${r.customerKey}`), kind: r.kind,
      preferredDates: r.preferredDates, description: r.description,
    }).onConflictDoNothing().returning({ id: serviceRequests.id })).length
  }
  return added
}
