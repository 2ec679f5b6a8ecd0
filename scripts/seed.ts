// Loads the demo scenario. Idempotent: every row has a stable id derived from its key and is
// inserted with ON CONFLICT DO NOTHING, so running it again changes nothing.
import { createHash } from 'node:crypto'
import { eq, sql } from 'drizzle-orm'
import { companies, customerContacts, customers, sites, users, waterFeatures } from '../server/db/schema'
import { ensureDefaultProfiles } from '../server/services/range-profiles'
import { featureSurfaceAreaM2, featureVolumeLitres } from '../shared/utils/water-chemistry'
import { closeDb, useDb } from '../server/utils/db'
import { hashPassword } from '../server/utils/password'
import { DEMO_PASSWORD, demoCompany, demoCustomers, demoStaff } from './seed/demo-data'
import { demoSitesAndFeatures } from './seed/demo-features'
import { seedReadings } from './seed/demo-readings'
import { seedRequests } from './seed/demo-requests'
import { seedInvoices } from './seed/demo-invoices'
import { seedSchedule } from './seed/demo-schedule'

/** A stable UUID (version-5 layout) for a demo key. */
export function demoId(key: string) {
  const h = createHash('sha1').update(`rillbook-demo:${key}`).digest('hex')
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-5${h.slice(13, 16)}-${((Number.parseInt(h.slice(16, 18), 16) & 0x3F) | 0x80).toString(16)}${h.slice(18, 20)}-${h.slice(20, 32)}`
}

export async function seedDemo() {
  const db = useDb()
  const companyId = demoId(demoCompany.key)
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  let added = 0
  await db.transaction(async (tx) => {
    const { key: _k, ...company } = demoCompany
    added += (await tx.insert(companies).values({ id: companyId, ...company }).onConflictDoNothing().returning({ id: companies.id })).length
    for (const s of demoStaff) {
      added += (await tx.insert(users).values({ id: demoId(s.key), companyId, email: s.email, name: s.name, role: s.role, passwordHash })
        .onConflictDoNothing().returning({ id: users.id })).length
    }
    for (const c of demoCustomers) {
      const customerId = demoId(c.key)
      added += (await tx.insert(customers).values({
        id: customerId, companyId, name: c.name, kind: c.kind, notes: c.notes ?? '', tags: c.tags ?? [],
        billingLine1: c.billing.line1, billingCity: c.billing.city, billingPostcode: c.billing.postcode, billingCountry: 'US', billingRegion: 'LF',
      }).onConflictDoNothing().returning({ id: customers.id })).length
      // Contacts only for a customer that has none (an upgraded database got them by migration).
      const [hasContacts] = await tx.select({ id: customerContacts.id }).from(customerContacts).where(eq(customerContacts.customerId, customerId)).limit(1)
      for (const [position, contact] of hasContacts ? [] : c.contacts.entries()) {
        added += (await tx.insert(customerContacts).values({ id: demoId(`contact-${c.key}-${position}`), customerId, position, ...contact })
          .onConflictDoNothing().returning({ id: customerContacts.id })).length
      }
      if (c.login) {
        added += (await tx.insert(users).values({ id: demoId(`login-${c.key}`), companyId, email: c.login.email, name: c.login.name, role: 'customer', customerId, passwordHash })
          .onConflictDoNothing().returning({ id: users.id })).length
      }
    }
    await ensureDefaultProfiles(tx, companyId)
    const { sites: demoSites, features } = demoSitesAndFeatures(demoCustomers.map(c => c.key))
    for (const site of demoSites) {
      const { key, customerKey, ...fields } = site
      added += (await tx.insert(sites).values({ id: demoId(key), companyId, customerId: demoId(customerKey), ...fields })
        .onConflictDoNothing().returning({ id: sites.id })).length
    }
    const customerOfSite = new Map(demoSites.map(s => [s.key, demoId(s.customerKey)]))
    for (const f of features) {
      const { key, siteKey, ...fields } = f
      added += (await tx.insert(waterFeatures).values({
        id: demoId(key), companyId, siteId: demoId(siteKey), customerId: customerOfSite.get(siteKey)!, ...fields,
        computedVolumeL: featureVolumeLitres(f.shape), surfaceAreaM2: featureSurfaceAreaM2(f.shape), measuredVolumeL: f.measuredVolumeL ?? null,
      }).onConflictDoNothing().returning({ id: waterFeatures.id })).length
    }
    const featureRefs = features.map(f => ({ id: demoId(f.key), kind: f.kind, customerKey: demoSites.find(s => s.key === f.siteKey)!.customerKey }))
    const schedule = await seedSchedule(tx, companyId, demoId, featureRefs, demoCustomers.map(c => c.key))
    added += schedule.added + await seedReadings(tx, companyId, demoId, schedule.contractIds)
    added += await seedInvoices(tx, companyId, schedule.contractIds)
    added += await seedRequests(tx, companyId, demoId)
  })
  return added
}

/** True when the database has no company yet (the start command seeds only then). */
export async function isEmpty() {
  const { rows } = await useDb().execute<{ n: number }>(sql`select count(*)::int as n from companies`)
  return (rows[0]?.n ?? 0) === 0
}

const invokedDirectly = process.argv[1]?.endsWith('seed.ts')
if (invokedDirectly) {
  const onlyIfEmpty = process.argv.includes('--if-empty')
  ;(async () => {
    if (onlyIfEmpty && !(await isEmpty())) {
      console.error('[seed] database already has data; not seeding')
      return
    }
    const added = await seedDemo()
    console.error(added ? `[seed] demo data loaded (${added} rows added)` : '[seed] demo data already present; nothing changed')
  })().then(() => closeDb(), async (err) => {
    console.error(`[seed] ${err.stack || err.message}`)
    process.exitCode = 1
    await closeDb()
  })
}
