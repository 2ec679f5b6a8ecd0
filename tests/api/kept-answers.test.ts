import { randomUUID } from 'node:crypto'
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { api, tokenFor } from '../helpers/api'
import { buildBook, closeTestDb, testDb } from '../helpers/billing-book'
import { startInstance, stopInstance, type Instance } from '../helpers/instances'

// Today, the schedule board, the customers list and the invoices table are kept per process
// until a change counter of their company moves (server/utils/versioned-cache.ts, topics
// 'schedule', 'customers' and 'invoices'). After every kind of change that feeds them, the test
// server and a second caching instance, both holding the previous step's answers, must answer
// what an instance that keeps nothing (RILLBOOK_ANSWER_CACHE=0) computes afresh. The changes are
// written straight into the database, as any writer (a script, a job, another instance) might:
// the counters follow the rows, not the app's own routes.
describe('answers kept between changes', () => {
  let cached: Instance
  let fresh: Instance
  let owner: string
  let companyId: string
  let customerId: string
  let siteId: string
  let featureId: string
  let contractId: string
  let techId: string
  const DAY = '2027-02-20'
  const WEEK = { from: '2027-02-15', to: '2027-02-21' }

  beforeAll(async () => {
    ;[cached, fresh] = await Promise.all([startInstance('kept-b', 1), startInstance('kept-fresh', 2, undefined, { RILLBOOK_ANSWER_CACHE: '0' })])
    const book = await buildBook('kept')
    companyId = book.companyId
    contractId = book.contracts.k4
    owner = await tokenFor(book.ownerEmail)
    const db = testDb()
    const [f] = await db.select().from(schema.waterFeatures).where(eq(schema.waterFeatures.companyId, companyId))
    featureId = f!.id
    siteId = f!.siteId
    customerId = f!.customerId
    const [tech] = await db.insert(schema.users).values({ companyId, email: `tech-${randomUUID()}@reedwater.example`, name: 'Wren Tansy', role: 'technician', passwordHash: 'not-for-signing-in' }).returning()
    techId = tech!.id
    await db.update(schema.sites).set({ latitude: 41.1, longitude: -87.9 }).where(eq(schema.sites.id, siteId))
    await db.update(schema.visits).set({ technicianId: techId }).where(eq(schema.visits.companyId, companyId))
  }, 120_000)
  afterAll(async () => {
    await Promise.all([stopInstance(cached), stopInstance(fresh)])
    await closeTestDb()
  })

  const paths = () => [
    `/api/today?date=${DAY}&technicianId=${techId}`,
    `/api/schedule?from=${WEEK.from}&to=${WEEK.to}&includeCancelled=true`,
    `/api/schedule?from=${WEEK.from}&to=${WEEK.to}&technicianId=${techId}`,
    '/api/customers?page=1&pageSize=25&sort=name&dir=asc&status=current',
    '/api/customers?page=1&pageSize=25&sort=name&dir=asc&q=Fenbrook',
    '/api/invoices?page=1&pageSize=25&sort=issueDate&dir=desc',
    '/api/invoices?page=1&pageSize=25&sort=issueDate&dir=desc&q=Household',
  ]
  async function expectFresh(step: string) {
    for (const path of paths()) {
      const want = await api(path, { token: owner, base: fresh.baseUrl })
      expect(want.status, `${step}: ${path}`).toBe(200)
      for (const [where, base] of [['the test server', undefined], ['the second instance', cached.baseUrl]] as const) {
        const got = await api(path, { token: owner, base })
        expect(got.status, `${step}: ${path} on ${where}`).toBe(200)
        expect(got.body, `${step}: ${path} on ${where}`).toEqual(want.body)
      }
    }
  }
  const day = () => testDb().select().from(schema.visits).where(and(eq(schema.visits.companyId, companyId), eq(schema.visits.scheduledOn, DAY)))

  it('equals a fresh computation after every kind of change', async () => {
    const db = testDb()
    await expectFresh('the book as built')
    await expectFresh('nothing changed')
    const today = await api(`/api/today?date=${DAY}&technicianId=${techId}`, { token: owner })
    expect(today.body.stops).toHaveLength(1)

    // Visits: planned, started, moved, given to nobody and back, cancelled, deleted.
    const [added] = await db.insert(schema.visits).values({ companyId, contractId, customerId, siteId, technicianId: techId, visitType: 'routine', scheduledOn: DAY, startsAt: new Date(`${DAY}T17:00:00Z`), durationMinutes: 45, status: 'scheduled' }).returning()
    await expectFresh('a visit planned')
    expect((await api(`/api/today?date=${DAY}&technicianId=${techId}`, { token: owner })).body.stops).toHaveLength(2)
    await db.update(schema.visits).set({ status: 'in_progress', startedAt: new Date(`${DAY}T17:05:00Z`) }).where(eq(schema.visits.id, added!.id))
    await expectFresh('a visit started')
    await db.update(schema.visits).set({ durationMinutes: 90, checklist: [{ label: 'Skim the surface' }] }).where(eq(schema.visits.id, added!.id))
    await expectFresh('a visit\'s length and checklist changed')
    await db.update(schema.visits).set({ scheduledOn: '2027-02-18' }).where(eq(schema.visits.id, added!.id))
    await expectFresh('a visit moved to another day')
    await db.update(schema.visits).set({ technicianId: null }).where(eq(schema.visits.id, added!.id))
    await expectFresh('a visit given to nobody')
    await db.update(schema.visits).set({ technicianId: techId, status: 'cancelled' }).where(eq(schema.visits.id, added!.id))
    await expectFresh('a visit cancelled')
    await db.delete(schema.visits).where(eq(schema.visits.id, added!.id))
    await expectFresh('a visit deleted')
    expect(await day()).toHaveLength(1)

    // The customer, their contact, site and feature.
    await db.update(schema.customers).set({ name: 'Book Household renamed', tags: ['koi'] }).where(eq(schema.customers.id, customerId))
    await expectFresh('the customer renamed')
    await db.update(schema.customerContacts).set({ email: 'new-address@household.example', phone: '555-0142' }).where(eq(schema.customerContacts.customerId, customerId))
    await expectFresh('a contact changed')
    await db.insert(schema.customerContacts).values({ customerId, name: 'Second Payer', email: 'second@household.example', position: -1 })
    await expectFresh('a contact added first')
    await db.update(schema.sites).set({ gateCode: '4471', hazards: ['deep_water'], hazardNotes: 'Steep bank on the east side', accessNotes: 'Side gate' }).where(eq(schema.sites.id, siteId))
    await expectFresh('the site\'s gate code and hazards')
    await db.update(schema.sites).set({ latitude: 41.3, longitude: -88.1, city: 'Fenbrook Heath' }).where(eq(schema.sites.id, siteId))
    await expectFresh('the site moved')
    await db.update(schema.waterFeatures).set({ name: 'Lily pond (upper)' }).where(eq(schema.waterFeatures.id, featureId))
    await expectFresh('a feature renamed')
    const [second] = await db.insert(schema.waterFeatures).values({
      companyId, customerId, siteId, name: 'Rill', kind: 'stream', shape: { kind: 'rectangle', lengthM: 4, widthM: 0.5, depthM: 0.2 }, surfaceAreaM2: 2, computedVolumeL: 400, equipment: {} as never,
    }).returning()
    await expectFresh('a feature added')
    await db.insert(schema.contractFeatures).values({ contractId, featureId: second!.id })
    await expectFresh('the contract covers one more feature')
    expect((await api(`/api/today?date=${DAY}&technicianId=${techId}`, { token: owner })).body.stops[0].features).toHaveLength(2)
    await db.delete(schema.contractFeatures).where(and(eq(schema.contractFeatures.contractId, contractId), eq(schema.contractFeatures.featureId, second!.id)))
    await expectFresh('the contract covers one feature less')
    await db.update(schema.waterFeatures).set({ archivedAt: new Date() }).where(eq(schema.waterFeatures.id, second!.id))
    await expectFresh('a feature archived')

    // Staff: the technician's name, home base, capacity; a sign-in's bookkeeping changes nothing shown.
    await db.update(schema.users).set({ name: 'Wren Tansy-Reed' }).where(eq(schema.users.id, techId))
    await expectFresh('the technician renamed')
    await db.insert(schema.staffProfiles).values({ userId: techId, homeLatitude: 41.0, homeLongitude: -87.7, capacityMinutes: 300 })
    await expectFresh('the technician\'s home base and capacity')
    await db.update(schema.staffProfiles).set({ capacityMinutes: 30 }).where(eq(schema.staffProfiles.userId, techId))
    await expectFresh('the technician\'s capacity cut')
    await db.update(schema.users).set({ lastSignInAt: new Date() }).where(eq(schema.users.id, techId))
    await expectFresh('the technician signed in')
    const [other] = await db.insert(schema.users).values({ companyId, email: `tech-${randomUUID()}@reedwater.example`, name: 'Aster Brook', role: 'technician', passwordHash: 'not-for-signing-in' }).returning()
    await expectFresh('a technician hired')
    await db.update(schema.users).set({ active: false }).where(eq(schema.users.id, other!.id))
    await expectFresh('a technician leaves')

    // The company's settings.
    await db.update(schema.companies).set({ baseLatitude: 41.5, baseLongitude: -88.0 }).where(eq(schema.companies.id, companyId))
    await db.delete(schema.staffProfiles).where(eq(schema.staffProfiles.userId, techId))
    await expectFresh('the company\'s yard, the technician\'s profile gone')

    // Invoices: one paid, one written off, one new.
    const [open] = await db.select().from(schema.invoices).where(and(eq(schema.invoices.companyId, companyId), eq(schema.invoices.status, 'due'))).limit(1)
    await db.update(schema.invoices).set({ status: 'paid', amountPaidMinor: open!.totalMinor, paidAt: new Date() }).where(eq(schema.invoices.id, open!.id))
    await expectFresh('an invoice paid')
    await db.insert(schema.invoices).values({
      companyId, customerId, currency: 'USD', taxRateBasisPoints: 800, number: '2027-0099', numberYear: 2027, numberSeq: 99, subtotalMinor: 10_000, taxMinor: 800, totalMinor: 10_800,
      source: 'manual', status: 'due', issueDate: '2027-03-01', dueDate: '2027-03-15',
    })
    await expectFresh('an invoice raised')
  })
})
