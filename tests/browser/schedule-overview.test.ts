// A company whose week holds more visits than one board answer carries: the owner sees each
// technician's days (over capacity in words), picks a technician to see their cards, and moves one
// of them with tap-to-move onto another technician's day in the overview.
import { sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import * as schema from '../../server/db/schema'
import { hashPassword } from '../../server/utils/password'
import { BOARD_VISIT_LIMIT } from '../../shared/schemas/visits'
import { DEMO_PASSWORD } from '../helpers/api'
import { closeTestDb, testDb } from '../helpers/billing-book'
import { launch, openSchedule, shot, VIEWPORTS } from '../helpers/browser'

// A fixed week far from the demo season and from whatever date the tests run on: Monday 7 June 2032.
const MONDAY = '2032-06-07'
const FRIDAY = '2032-06-11'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

/** Two busy technicians with more than BOARD_VISIT_LIMIT visits between them, and one with a few (Monday and Tuesday). */
async function bigWeek(label: string) {
  const tag = `${label}-${Date.now().toString(36)}`
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  return testDb().transaction(async (tx) => {
    const [company] = await tx.insert(schema.companies).values({ name: `Broadwater Test ${tag}`, currency: 'USD', unitSystem: 'us', timeZone: 'America/Chicago' }).returning()
    const companyId = company!.id
    const ownerEmail = `owner-${tag}@broadwater.example`
    await tx.insert(schema.users).values({ companyId, email: ownerEmail, name: 'Broad Owner', role: 'owner', passwordHash })
    const techs: Array<{ id: string, name: string }> = []
    for (const name of ['Ansel Busy', 'Bea Busy', 'Cora Quiet']) {
      const [u] = await tx.insert(schema.users).values({ companyId, email: `${name.split(' ')[0]!.toLowerCase()}-${tag}@broadwater.example`, name, role: 'technician', passwordHash }).returning()
      await tx.insert(schema.staffProfiles).values({ userId: u!.id, capacityMinutes: 420, homeLatitude: 44.1, homeLongitude: -91.3 })
      techs.push({ id: u!.id, name })
    }
    const [cust] = await tx.insert(schema.customers).values({ companyId, name: `Broad Household ${tag}`, billingLine1: '1 Wide Row', billingCity: 'Fenbrook' }).returning()
    const [site] = await tx.insert(schema.sites).values({ companyId, customerId: cust!.id, name: 'Garden', line1: '1 Wide Row', city: 'Fenbrook', latitude: 44.15, longitude: -91.34 }).returning()
    const [a, b, c] = techs
    await tx.execute(sql`insert into visits (company_id, customer_id, site_id, visit_type, scheduled_on, starts_at, duration_minutes, technician_id)
      select ${companyId}, ${cust!.id}, ${site!.id}, 'routine', ${MONDAY}::date + (g % 5), now(), 20, case when g % 2 = 0 then ${a!.id}::uuid else ${b!.id}::uuid end
      from generate_series(1, ${BOARD_VISIT_LIMIT + 100}) g`)
    await tx.execute(sql`insert into visits (company_id, customer_id, site_id, visit_type, scheduled_on, starts_at, duration_minutes, technician_id)
      select ${companyId}, ${cust!.id}, ${site!.id}, 'routine', ${MONDAY}::date + (g % 2), now(), 60, ${c!.id}::uuid from generate_series(1, 4) g`)
    return { companyId, ownerEmail, busy: a!, quiet: c!, customerName: cust!.name }
  })
}

describe('the schedule of a large company', () => {
  for (const size of Object.keys(VIEWPORTS) as Array<keyof typeof VIEWPORTS>) {
    it(`the owner reads each technician's days, picks one, and moves a visit onto another technician's day (${size})`, async () => {
      const fx = await bigWeek(size)
      const { context, page } = await openSchedule(browser, size, fx.ownerEmail, MONDAY)
      await expect(page.getByTestId('too-many').textContent()).resolves.toMatch(/more than 1,000 visits: too many to show as cards/)
      const overview = page.getByTestId('load-overview')
      // 1,100 visits of 20 minutes over five days for each busy technician: 110 a day, far over capacity, said in words.
      const busyMonday = overview.getByTestId(`overview-${MONDAY}-${fx.busy.id}`)
      await expect(busyMonday.textContent()).resolves.toMatch(/110 visits.*Over by/)
      await expect(overview.getByTestId('over-days').textContent()).resolves.toBe('10 technician-days are over capacity')
      await expect(overview.getByTestId(`overview-${MONDAY}-${fx.quiet.id}`).textContent()).resolves.toMatch(/^2 visits/)
      expect(await page.locator('[data-visit]').count()).toBe(0)
      await shot(page, `schedule-overview-${size}`)

      // The quiet technician's week: every card of theirs.
      await overview.getByRole('button', { name: `Show the visits of ${fx.quiet.name}` }).click()
      await page.locator('[data-visit]').first().waitFor()
      expect(await page.locator('[data-visit]').count()).toBe(4)
      expect(await page.getByTestId('too-many').count()).toBe(0)
      await shot(page, `schedule-overview-picked-${size}`)

      // Tap-to-move one of them onto Friday of a busy technician, straight from the overview.
      await page.getByRole('button', { name: new RegExp(`^Move ${fx.customerName}`) }).first().click()
      await overview.getByRole('button', { name: 'Show everyone' }).click()
      await overview.getByRole('button', { name: new RegExp(`^Put ${fx.customerName} on Fri, Jun 11 with ${fx.busy.name}$`) }).click()
      await expect(page.getByTestId('drop-note').textContent()).resolves.toMatch(/over capacity/)
      const [moved] = (await testDb().execute(sql`select count(*)::int as n from visits where company_id = ${fx.companyId} and technician_id = ${fx.busy.id} and scheduled_on = ${FRIDAY} and moved_manually`)).rows as Array<{ n: number }>
      expect(moved!.n).toBe(1)
      await context.close()
    })
  }
})
