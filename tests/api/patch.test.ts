import { randomUUID } from 'node:crypto'
import { and, asc, eq } from 'drizzle-orm'
import fc from 'fast-check'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { hashPassword } from '../../server/utils/password'
import { HAZARDS } from '../../shared/schemas/sites'
import { FEATURE_KINDS } from '../../shared/types/water'
import { api, DEMO_PASSWORD, tokenFor } from '../helpers/api'
import { closeTestDb, testDb } from '../helpers/billing-book'
import { listApiRoutes } from '../helpers/routes'

// PATCH means patch, on every update route (listed from the file system): random subsets of
// valid fields are sent, the record is read back from the database, and only the fields sent
// (and what is computed from them) may differ; nested lists (contacts, pumps, fish, hazards,
// templates, lines…) stay as they were unless their key was sent. Archive and restore are among
// the fields. Everything runs on a company built here, for the day the test runs.

const db = testDb()
const tag = `patch-${Date.now().toString(36)}`
const ids: Record<string, string> = {}
const tokens: Record<'owner' | 'customer', string> = { owner: '', customer: '' }

/** A date `days` after today (UTC), as YYYY-MM-DD: built for whatever day the test runs on. */
const dayFromNow = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10)

// ---- values a form could send, already in the form the API stores them ----------------------
const word = fc.stringMatching(/^[A-Za-z][A-Za-z0-9 ]{0,18}[A-Za-z0-9]$/)
const optText = fc.oneof(fc.constant(''), word)
const lowerWord = fc.stringMatching(/^[a-z]{1,12}$/)
const bool = fc.boolean()
const coord = (max: number) => fc.integer({ min: -max * 1000, max: max * 1000 }).map(n => n / 1000)
const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: null })
const some = <T extends Record<string, fc.Arbitrary<unknown>>>(fields: T) => fc.record(fields, { requiredKeys: [] })
const email = lowerWord.map(w => `${w}@patch.example`)
const contact = fc.record({ name: word, email, phone: fc.constantFrom('', '555 0100', '+1 (555) 0199'), getsReports: bool, getsInvoices: bool, getsAlerts: bool })
const shape = fc.record({ kind: fc.constant('rectangle'), lengthM: fc.integer({ min: 1, max: 40 }), widthM: fc.integer({ min: 1, max: 40 }), depthM: fc.integer({ min: 1, max: 30 }).map(n => n / 10) })
const pump = fc.record({ name: word, role: fc.constantFrom('waterfall', 'filter', 'stream'), ratedFlowLph: fc.integer({ min: 100, max: 50_000 }) })
const range = fc.constantFrom({}, { pH: { actBelow: 6, watchBelow: 6.5, watchAbove: 8.5, actAbove: 9, source: 'set by the company', sourceKind: 'common practice' } })
const template = fc.record({ visitType: fc.constantFrom('routine', 'water_test'), rrule: fc.constantFrom('FREQ=MONTHLY;BYMONTHDAY=10', 'FREQ=WEEKLY;INTERVAL=2;BYDAY=TU'), durationMinutes: fc.integer({ min: 10, max: 720 }), checklist: fc.array(fc.record({ label: word }), { maxLength: 3 }) })
const line = fc.record({ kind: fc.constantFrom('labour', 'part', 'other'), description: word, quantity: fc.integer({ min: 1, max: 10 }), unitPriceMinor: fc.integer({ min: 0, max: 100_000 }), taxable: bool })

type Body = Record<string, unknown>
type State = Record<string, unknown>
interface Spec {
  /** The path with the record's id in it. */
  path: () => string
  token: () => string
  /** Random subsets of valid fields. */
  body: fc.Arbitrary<Body>
  /**
   * Puts the record back in a full state before each run, every field away from its default, so
   * a field blanked by a PATCH that did not name it is seen.
   */
  reset?: () => Promise<void>
  /** Makes a subset consistent (fields that go together); an empty result is not sent. */
  fixup?: (b: Body) => Body
  /** The record as stored, with its nested lists. */
  state: () => Promise<State>
  /** Stored keys a sent key may change besides its own (computed columns, archive state). */
  derived?: Record<string, string[]>
  /** Keys whose stored value must equal the value sent. */
  echo: string[]
  /** Further checks of what a sent key did. */
  check?: (b: Body, before: State, after: State) => void
}

const one = async <T>(rows: Promise<T[]>) => (await rows)[0] as T
const put = (path: () => string, full: () => Body) => async () => {
  const r = await api(path(), { method: 'PATCH', token: tokens.owner, body: full() })
  expect(r.status, `reset ${path()}: ${JSON.stringify(r.body).slice(0, 300)}`).toBe(200)
}
const fullContact = (n: string) => ({ name: n, email: `${n.toLowerCase()}@patch.example`, phone: '555 0100', getsReports: true, getsInvoices: false, getsAlerts: true })
const richEquipment = () => ({
  pumps: [{ name: 'Main', role: 'waterfall', ratedFlowLph: 9000 }], intake: 'skimmer', biologicalFilter: true, wetlandFilter: true,
  uvClarifier: { watts: 36, bulbInstalledOn: '2025-04-01' }, aerator: true, deIcer: true, autoDosing: true, ionizer: true, notes: 'Skimmer left',
})
const richOverrides = () => ({ pH: { actBelow: 6, watchBelow: 6.5, source: 'set by the company', sourceKind: 'common practice' } })
const ARCHIVE = { archived: ['archivedAt'] }

const SPECS: Record<string, Spec> = {
  'PATCH /api/customers/:id': {
    path: () => `/api/customers/${ids.customerA}`,
    token: () => tokens.owner,
    reset: put(() => `/api/customers/${ids.customerA}`, () => ({
      name: 'Patch A', kind: 'business', contacts: [fullContact('Ada'), fullContact('Bo')], billingLine1: '1 Reed Lane', billingLine2: 'Unit 2',
      billingCity: 'Fenbrook', billingRegion: 'IL', billingPostcode: '60601', billingCountry: 'CA', tags: ['koi', 'weekly'], notes: 'Ring twice', active: false, archived: true,
    })),
    body: some({
      name: word, kind: fc.constantFrom('household', 'business', 'association', 'public'), contacts: fc.array(contact, { maxLength: 3 }),
      billingLine1: optText, billingLine2: optText, billingCity: optText, billingRegion: optText, billingPostcode: fc.constantFrom('', '60601', 'SW1A 1AA'),
      billingCountry: fc.constantFrom('US', 'CA', 'GB'), tags: fc.uniqueArray(lowerWord, { maxLength: 4 }), notes: optText, active: bool, archived: bool,
    }),
    state: async () => ({
      ...await one(db.select().from(schema.customers).where(eq(schema.customers.id, ids.customerA!))),
      contacts: await db.select().from(schema.customerContacts).where(eq(schema.customerContacts.customerId, ids.customerA!)).orderBy(asc(schema.customerContacts.position)),
    }),
    derived: ARCHIVE,
    echo: ['name', 'kind', 'billingLine1', 'billingLine2', 'billingCity', 'billingRegion', 'billingPostcode', 'billingCountry', 'tags', 'notes', 'active'],
    check: (b, _before, after) => {
      if (b.archived !== undefined) expect(after.archivedAt != null).toBe(b.archived)
      if (b.contacts) expect((after.contacts as Body[]).map(c => c.name)).toEqual((b.contacts as Body[]).map(c => c.name))
    },
  },
  'PATCH /api/sites/:id': {
    path: () => `/api/sites/${ids.siteB}`,
    token: () => tokens.owner,
    reset: put(() => `/api/sites/${ids.siteB}`, () => ({
      name: 'Home', line1: '1 Reed Lane', line2: 'Rear', city: 'Fenbrook', region: 'IL', postcode: '60601', country: 'CA', latitude: 41.8, longitude: -87.7,
      altitudeM: 180, accessNotes: 'Back gate', gateCode: '2468', hazards: ['dogs', 'deep_water'], hazardNotes: 'Two dogs', archived: true,
    })),
    body: some({
      name: word, line1: word, line2: optText, city: word, region: optText, postcode: optText, country: fc.constantFrom('US', 'CA'),
      latitude: maybe(coord(90)), longitude: maybe(coord(180)), altitudeM: maybe(fc.integer({ min: -500, max: 6000 })),
      accessNotes: optText, gateCode: fc.constantFrom('', '1234#', 'side gate'), hazards: fc.uniqueArray(fc.constantFrom(...HAZARDS), { maxLength: 3 }), hazardNotes: optText, archived: bool,
    }),
    // Latitude and longitude go together.
    fixup: (b) => {
      if (('latitude' in b) !== ('longitude' in b) || (b.latitude === null) !== (b.longitude === null)) {
        const { latitude: _a, longitude: _o, ...rest } = b
        return rest
      }
      return b
    },
    state: () => one(db.select().from(schema.sites).where(eq(schema.sites.id, ids.siteB!))),
    derived: ARCHIVE,
    echo: ['name', 'line1', 'line2', 'city', 'region', 'postcode', 'country', 'latitude', 'longitude', 'altitudeM', 'accessNotes', 'gateCode', 'hazards', 'hazardNotes'],
  },
  'PATCH /api/features/:id': {
    path: () => `/api/features/${ids.featureA}`,
    token: () => tokens.owner,
    reset: put(() => `/api/features/${ids.featureA}`, () => ({
      name: 'Koi pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 1.2 }, measuredVolumeL: 14000, equipment: richEquipment(),
      fish: [{ kind: 'koi', count: 8 }], plants: 'Water lilies', notes: 'Heron netting in winter', installedOn: '2019-06-01', rangeProfileId: ids.profile,
      rangeOverrides: richOverrides(), archived: true,
    })),
    body: some({
      name: word, kind: fc.constantFrom(...FEATURE_KINDS), shape, measuredVolumeL: maybe(fc.integer({ min: 100, max: 500_000 })),
      equipment: some({ pumps: fc.array(pump, { maxLength: 3 }), intake: fc.constantFrom('none', 'skimmer', 'intake_bay'), biologicalFilter: bool, aerator: bool, deIcer: bool, notes: optText }),
      fish: fc.array(fc.record({ kind: word, count: fc.integer({ min: 0, max: 500 }) }), { maxLength: 3 }), plants: optText, notes: optText,
      installedOn: maybe(fc.integer({ min: 0, max: 9000 }).map(d => new Date(Date.UTC(2000, 0, 1) + d * 86_400_000).toISOString().slice(0, 10))),
      rangeProfileId: fc.constantFrom(null, 'profile'), rangeOverrides: range, archived: bool,
    }),
    fixup: (b) => {
      const out = { ...b }
      if (out.rangeProfileId === 'profile') out.rangeProfileId = ids.profile
      if (out.equipment && Object.keys(out.equipment).length === 0) delete out.equipment
      return out
    },
    state: () => one(db.select().from(schema.waterFeatures).where(eq(schema.waterFeatures.id, ids.featureA!))),
    derived: { ...ARCHIVE, shape: ['computedVolumeL', 'surfaceAreaM2'] },
    echo: ['name', 'kind', 'shape', 'measuredVolumeL', 'fish', 'plants', 'notes', 'installedOn', 'rangeProfileId'],
    check: (b, before, after) => {
      // Equipment is patched key by key: the keys not sent (pumps among them) stay.
      if (b.equipment) expect(after.equipment).toEqual({ ...before.equipment as Body, ...b.equipment as Body })
    },
  },
  'PATCH /api/products/:id': {
    path: () => `/api/products/${ids.product}`,
    token: () => tokens.owner,
    reset: put(() => `/api/products/${ids.product}`, () => ({ name: 'Water conditioner', kind: 'dechlorinator', labelAmount: 5, labelUnit: 'mL', labelPerLitres: 40, cautions: ['Keep from children', 'Shake well'], archived: true })),
    body: some({
      name: word, kind: fc.constantFrom('dechlorinator', 'bacteria', 'kh_buffer', 'salt', 'other'), labelAmount: fc.integer({ min: 1, max: 1000 }),
      labelUnit: fc.constantFrom('mL', 'g'), labelPerLitres: fc.integer({ min: 1, max: 10_000 }), cautions: fc.array(word, { maxLength: 3 }), archived: bool,
    }),
    state: () => one(db.select().from(schema.products).where(eq(schema.products.id, ids.product!))),
    derived: ARCHIVE,
    echo: ['name', 'kind', 'labelAmount', 'labelUnit', 'labelPerLitres', 'cautions'],
  },
  'PATCH /api/plans/:id': {
    path: () => `/api/plans/${ids.plan}`,
    token: () => tokens.owner,
    reset: put(() => `/api/plans/${ids.plan}`, () => ({
      name: 'Season care', description: 'Spring to fall', priceMinor: 120_000, currency: 'USD', billingCadence: 'monthly', termMonths: 12, autoRenewDefault: false, archived: true,
      templates: [{ visitType: 'routine', rrule: 'FREQ=MONTHLY;BYMONTHDAY=10', durationMinutes: 60, checklist: [{ label: 'Skimmer' }] }],
    })),
    body: some({
      name: word, description: optText, priceMinor: fc.integer({ min: 0, max: 1_000_000 }), currency: fc.constantFrom('USD', 'EUR'),
      billingCadence: fc.constantFrom('yearly', 'monthly', 'per_visit'), termMonths: fc.integer({ min: 1, max: 36 }), autoRenewDefault: bool,
      templates: fc.array(template, { minLength: 1, maxLength: 2 }), archived: bool,
    }),
    state: async () => ({
      ...await one(db.select().from(schema.plans).where(eq(schema.plans.id, ids.plan!))),
      templates: await db.select().from(schema.planVisitTemplates).where(eq(schema.planVisitTemplates.planId, ids.plan!)).orderBy(asc(schema.planVisitTemplates.position)),
    }),
    derived: ARCHIVE,
    echo: ['name', 'description', 'priceMinor', 'currency', 'billingCadence', 'termMonths', 'autoRenewDefault'],
  },
  'PATCH /api/contracts/:id': {
    path: () => `/api/contracts/${ids.contract}`,
    token: () => tokens.owner,
    body: some({
      featureIds: fc.subarray(['featureB', 'featureC'], { minLength: 1 }), termStart: fc.integer({ min: 0, max: 90 }).map(dayFromNow),
      priceOverrideMinor: maybe(fc.integer({ min: 0, max: 1_000_000 })), autoRenew: bool, notes: optText,
    }),
    fixup: b => (b.featureIds ? { ...b, featureIds: (b.featureIds as string[]).map(k => ids[k]) } : b),
    state: async () => ({
      ...await one(db.select().from(schema.contracts).where(eq(schema.contracts.id, ids.contract!))),
      featureIds: (await db.select().from(schema.contractFeatures).where(eq(schema.contractFeatures.contractId, ids.contract!)).orderBy(asc(schema.contractFeatures.position))).map(f => f.featureId),
    }),
    derived: { termStart: ['termEnd'] },
    echo: ['featureIds', 'termStart', 'priceOverrideMinor', 'autoRenew', 'notes'],
  },
  'PATCH /api/invoices/:id': {
    path: () => `/api/invoices/${ids.invoice}`,
    token: () => tokens.owner,
    body: some({ lines: fc.array(line, { minLength: 1, maxLength: 3 }), notes: optText }),
    state: async () => ({
      ...await one(db.select().from(schema.invoices).where(eq(schema.invoices.id, ids.invoice!))),
      lines: await db.select().from(schema.invoiceLines).where(eq(schema.invoiceLines.invoiceId, ids.invoice!)).orderBy(asc(schema.invoiceLines.position)),
    }),
    derived: { lines: ['subtotalMinor', 'taxMinor', 'totalMinor'] },
    echo: ['notes'],
    check: (b, _before, after) => {
      if (b.lines) expect((after.lines as Body[]).map(l => l.description)).toEqual((b.lines as Body[]).map(l => l.description))
    },
  },
  'PATCH /api/company': {
    path: () => '/api/company',
    token: () => tokens.owner,
    body: some({
      name: word, currency: fc.constantFrom('USD', 'EUR', 'CAD'), taxRateBasisPoints: fc.integer({ min: 0, max: 5000 }), unitSystem: fc.constantFrom('us', 'metric'),
      timeZone: fc.constantFrom('America/Chicago', 'Europe/London', 'UTC'), workingDays: fc.uniqueArray(fc.integer({ min: 1, max: 7 }), { minLength: 1, maxLength: 7 }).map(d => d.sort()),
      dayStartTime: fc.constantFrom('07:30', '08:00'), baseLatitude: maybe(coord(90)), baseLongitude: maybe(coord(180)), address: optText,
      billingEmail: fc.constantFrom('', 'billing@patch.example'), paymentTermsDays: fc.integer({ min: 0, max: 120 }),
    }),
    state: () => one(db.select().from(schema.companies).where(eq(schema.companies.id, ids.company!))),
    echo: ['name', 'currency', 'taxRateBasisPoints', 'unitSystem', 'timeZone', 'workingDays', 'dayStartTime', 'baseLatitude', 'baseLongitude', 'address', 'billingEmail', 'paymentTermsDays'],
  },
  'PATCH /api/users/:id': {
    path: () => `/api/users/${ids.staffUser}`,
    token: () => tokens.owner,
    body: some({ name: word, role: fc.constantFrom('owner', 'technician'), active: bool, password: fc.constantFrom('heron-marsh-lantern', 'quiet-reed-bank-42') }),
    state: () => one(db.select().from(schema.users).where(eq(schema.users.id, ids.staffUser!))),
    derived: { password: ['passwordHash', 'passwordChangedAt', 'failedSignIns', 'lockedUntil'] },
    echo: ['name', 'role', 'active'],
  },
  'PATCH /api/technicians/:id': {
    path: () => `/api/technicians/${ids.technician}`,
    token: () => tokens.owner,
    body: some({ capacityMinutes: fc.integer({ min: 60, max: 960 }), homeLatitude: maybe(coord(90)), homeLongitude: maybe(coord(180)) }),
    state: () => one(db.select().from(schema.staffProfiles).where(eq(schema.staffProfiles.userId, ids.technician!))),
    echo: ['capacityMinutes', 'homeLatitude', 'homeLongitude'],
  },
  'PATCH /api/range-profiles/:id': {
    path: () => `/api/range-profiles/${ids.profile}`,
    token: () => tokens.owner,
    body: some({ name: word, ranges: range }),
    state: () => one(db.select().from(schema.rangeProfiles).where(eq(schema.rangeProfiles.id, ids.profile!))),
    echo: ['name'],
  },
  'PATCH /api/visits/:id': {
    path: () => `/api/visits/${ids.visit}`,
    token: () => tokens.owner,
    body: some({ technicianId: fc.constantFrom(null, 'technician'), scheduledOn: fc.integer({ min: 1, max: 60 }).map(dayFromNow), moveReason: word, durationMinutes: fc.integer({ min: 10, max: 720 }) }),
    fixup: (b) => {
      const out = { ...b }
      if (out.technicianId === 'technician') out.technicianId = ids.technician
      if (out.scheduledOn && !out.moveReason) out.moveReason = 'The customer asked'
      return out
    },
    state: () => one(db.select().from(schema.visits).where(eq(schema.visits.id, ids.visit!))),
    derived: { scheduledOn: ['startsAt', 'movedManually', 'unplacedReason', 'moveReason', 'routePosition'], technicianId: ['movedManually', 'unplacedReason'], '*': ['sequence'] },
    echo: ['technicianId', 'durationMinutes'],
    check: (b, before, after) => {
      if (b.scheduledOn) expect(after.scheduledOn).toBe(b.scheduledOn)
      if (b.scheduledOn && b.scheduledOn !== before.scheduledOn) expect(after.moveReason).toBe(b.moveReason)
    },
  },
  // A state change rather than fields: acknowledging keeps the note unless one is sent.
  'PATCH /api/alerts/:id': {
    path: () => `/api/alerts/${ids.alert}`,
    token: () => tokens.owner,
    reset: async () => { await db.update(schema.alerts).set({ status: 'open', note: 'Called the owner' }).where(eq(schema.alerts.id, ids.alert!)) },
    body: fc.record({ status: fc.constant('acknowledged'), note: word }, { requiredKeys: ['status'] }),
    state: () => one(db.select().from(schema.alerts).where(eq(schema.alerts.id, ids.alert!))),
    echo: ['status', 'note'],
  },
  'PATCH /api/portal/preferences': {
    path: () => '/api/portal/preferences',
    token: () => tokens.customer,
    body: some({
      unitSystem: fc.constantFrom(null, 'us', 'metric'),
      contacts: fc.subarray([0, 1]).chain(idx => fc.tuple(...idx.map(i => fc.record({ i: fc.constant(i), getsReports: bool, getsInvoices: bool, getsAlerts: bool })))),
    }),
    fixup: (b) => {
      if (!b.contacts) return b
      return { ...b, contacts: (b.contacts as Array<Body & { i: number }>).map(({ i, ...flags }) => ({ id: ids[`contactB${i}`], ...flags })) }
    },
    state: async () => ({
      unitSystem: (await one(db.select().from(schema.users).where(eq(schema.users.id, ids.customerLogin!)))).unitSystem,
      contacts: await db.select().from(schema.customerContacts).where(eq(schema.customerContacts.customerId, ids.customerB!)).orderBy(asc(schema.customerContacts.position)),
    }),
    echo: ['unitSystem'],
    check: (b, before, after) => {
      const sent = new Map((b.contacts as Body[] | undefined ?? []).map(c => [c.id, c]))
      for (const [i, c] of (after.contacts as Body[]).entries()) {
        const s = sent.get(c.id)
        if (s) expect({ r: c.getsReports, i: c.getsInvoices, a: c.getsAlerts }).toEqual({ r: s.getsReports, i: s.getsInvoices, a: s.getsAlerts })
        else expect(c).toEqual((before.contacts as Body[])[i])
      }
    },
  },
}

beforeAll(async () => {
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  const [company] = await db.insert(schema.companies).values({ name: `Patch Test ${tag}`, currency: 'USD', taxRateBasisPoints: 800, unitSystem: 'us', timeZone: 'America/Chicago' }).returning()
  const companyId = ids.company = company!.id
  const mk = async (role: 'owner' | 'technician' | 'customer', name: string, customerId?: string) => {
    const [u] = await db.insert(schema.users).values({ companyId, email: `${name}-${tag}@patch.example`, name, role, passwordHash, customerId }).returning()
    return u!
  }
  const owner = await mk('owner', 'owner')
  ids.technician = (await mk('technician', 'tech')).id
  ids.staffUser = (await mk('technician', 'staff')).id
  await db.insert(schema.staffProfiles).values({ userId: ids.technician, capacityMinutes: 400, homeLatitude: 41.9, homeLongitude: -87.6 })
  const [profile] = await db.insert(schema.rangeProfiles).values({ companyId, key: 'koi_pond', name: 'Koi ponds', ranges: { pH: { actBelow: 6.5, watchBelow: 7, source: 'set by the company', sourceKind: 'common practice' } } }).returning()
  ids.profile = profile!.id
  tokens.owner = await tokenFor(owner.email)

  const post = async (path: string, body: unknown) => {
    const r = await api(path, { method: 'POST', token: tokens.owner, body })
    expect(r.status, `${path}: ${JSON.stringify(r.body)}`).toBeLessThan(300)
    return r.body
  }
  const customer = (name: string) => ({
    name, kind: 'household', contacts: [fullContact('Ada'), fullContact('Bo')], billingLine1: '1 Reed Lane', billingCity: 'Fenbrook',
    billingPostcode: '60601', tags: ['koi', 'weekly'], notes: 'Ring twice', active: true,
  })
  const a = await post('/api/customers', customer('Patch A'))
  ids.customerA = a.id
  const b = await post('/api/customers', customer('Patch B'))
  ids.customerB = b.id
  ids.contactB0 = b.contacts[0].id
  ids.contactB1 = b.contacts[1].id
  ids.customerLogin = (await mk('customer', 'login', ids.customerB)).id
  tokens.customer = await tokenFor(`login-${tag}@patch.example`)
  const site = (customerId: string) => ({
    customerId, name: 'Home', line1: '1 Reed Lane', city: 'Fenbrook', latitude: 41.8, longitude: -87.7, altitudeM: 180,
    accessNotes: 'Back gate', gateCode: '2468', hazards: ['dogs', 'deep_water'], hazardNotes: 'Two dogs',
  })
  const siteA = await post('/api/sites', site(ids.customerA))
  ids.siteB = (await post('/api/sites', site(ids.customerA))).id
  const feature = (name: string) => ({
    siteId: siteA.id, name, kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 1.2 }, measuredVolumeL: 14000,
    equipment: { pumps: [{ name: 'Main', role: 'waterfall', ratedFlowLph: 9000 }], intake: 'skimmer', biologicalFilter: true, uvClarifier: { watts: 36, bulbInstalledOn: '2025-04-01' }, notes: 'Skimmer left' },
    fish: [{ kind: 'koi', count: 8 }], plants: 'Water lilies', notes: 'Heron netting in winter', installedOn: '2019-06-01', rangeProfileId: ids.profile,
    rangeOverrides: { pH: { actBelow: 6, watchBelow: 6.5, source: 'set by the company', sourceKind: 'common practice' } },
  })
  ids.featureA = (await post('/api/features', feature('Koi pond'))).id
  ids.featureB = (await post('/api/features', feature('Stream'))).id
  ids.featureC = (await post('/api/features', feature('Bog'))).id
  ids.product = (await post('/api/products', { name: 'Water conditioner', kind: 'dechlorinator', labelAmount: 5, labelUnit: 'mL', labelPerLitres: 40, cautions: ['Keep from children', 'Shake well'] })).id
  ids.plan = (await post('/api/plans', {
    name: 'Season care', description: 'Spring to fall', priceMinor: 120_000, currency: 'USD', billingCadence: 'monthly', termMonths: 12, autoRenewDefault: true,
    templates: [{ visitType: 'routine', rrule: 'FREQ=MONTHLY;BYMONTHDAY=10', durationMinutes: 60, checklist: [{ label: 'Skimmer' }] }],
  })).id
  ids.contract = (await post('/api/contracts', { customerId: ids.customerA, planId: ids.plan, featureIds: [ids.featureB], termStart: dayFromNow(7), priceOverrideMinor: 99_000, notes: 'Gate code on file' })).id
  ids.invoice = (await post('/api/invoices', { customerId: ids.customerA, lines: [{ kind: 'labour', description: 'Pump repair', quantity: 2, unitPriceMinor: 4500 }], notes: 'Thank you' })).id
  const [visit] = await db.insert(schema.visits).values({
    companyId, customerId: ids.customerA, siteId: siteA.id, visitType: 'repair', scheduledOn: dayFromNow(10), startsAt: new Date(Date.now() + 10 * 86_400_000),
    durationMinutes: 90, technicianId: ids.technician, customerNotes: 'Bring netting', internalNotes: 'Dog friendly',
  }).returning()
  ids.visit = visit!.id
  const [alert] = await db.insert(schema.alerts).values({
    companyId, subjectKey: `test:${randomUUID()}`, condition: 'reading', severity: 'watch', featureId: ids.featureA, title: 'pH low', detail: 'pH 6.4', value: 6.4, note: 'Called the owner',
  }).returning()
  ids.alert = alert!.id
})

afterAll(async () => {
  await closeTestDb()
})

const patchRoutes = listApiRoutes().filter(r => r.method === 'PATCH')

describe('PATCH means patch', () => {
  it('has a spec for every PATCH route', () => {
    expect(patchRoutes.length).toBeGreaterThan(10)
    for (const r of patchRoutes) expect(SPECS[r.key], `${r.key}: add it to SPECS in tests/api/patch.test.ts`).toBeTruthy()
  })

  for (const r of patchRoutes) {
    const spec = SPECS[r.key]
    if (!spec) continue
    it(`${r.key}: only the fields sent change`, async () => {
      let sentCount = 0
      await fc.assert(fc.asyncProperty(spec.body, async (raw) => {
        const body = spec.fixup ? spec.fixup(raw) : raw
        if (Object.keys(body).length === 0) return
        await spec.reset?.()
        const before = await spec.state()
        const res = await api(spec.path(), { method: 'PATCH', token: spec.token(), body })
        expect(res.status, `${r.key} ${JSON.stringify(body)} → ${JSON.stringify(res.body).slice(0, 400)}`).toBe(200)
        sentCount++
        const after = await spec.state()
        const mayChange = new Set(['updatedAt', ...(spec.derived?.['*'] ?? [])])
        for (const k of Object.keys(body)) {
          mayChange.add(k)
          for (const d of spec.derived?.[k] ?? []) mayChange.add(d)
        }
        for (const k of Object.keys(before)) {
          if (!mayChange.has(k)) expect(after[k], `${r.key}: ${k} changed though only ${Object.keys(body).join(', ')} was sent`).toEqual(before[k])
        }
        for (const k of spec.echo) {
          if (k in body) expect(after[k], `${r.key}: ${k} was sent`).toEqual(body[k])
        }
        spec.check?.(body, before, after)
      }), { numRuns: 15, seed: 20261213 })
      expect(sentCount).toBeGreaterThan(5)
    })
  }
})

describe('the cases from the issue', () => {
  it('a customer renamed keeps contacts, tags, notes and billing address; archive and restore touch only the archive state', async () => {
    const full = {
      contacts: [{ name: 'Ada', email: 'ada@patch.example', getsReports: true, getsInvoices: true, getsAlerts: false }], tags: ['koi'],
      notes: 'Ring twice', billingLine1: '1 Reed Lane', billingCity: 'Fenbrook', archived: false,
    }
    expect((await api(`/api/customers/${ids.customerA}`, { method: 'PATCH', token: tokens.owner, body: full })).status).toBe(200)
    const before = await SPECS['PATCH /api/customers/:id']!.state()
    expect((before.contacts as unknown[]).length).toBe(1)
    for (const body of [{ name: 'Renamed' }, { archived: true }, { archived: false }]) {
      expect((await api(`/api/customers/${ids.customerA}`, { method: 'PATCH', token: tokens.owner, body })).status).toBe(200)
    }
    const after = await SPECS['PATCH /api/customers/:id']!.state()
    const { name: _n, updatedAt: _u, archivedAt, ...rest } = after
    const { name: _n2, updatedAt: _u2, ...restBefore } = before
    expect(after.name).toBe('Renamed')
    expect(archivedAt).toBeNull()
    expect({ ...rest, archivedAt: restBefore.archivedAt }).toEqual(restBefore)
  })

  it('an empty PATCH is a 400 that says so, on every PATCH route', async () => {
    for (const r of patchRoutes) {
      const spec = SPECS[r.key]!
      const res = await api(spec.path(), { method: 'PATCH', token: spec.token(), body: {} })
      expect(res.status, `${r.key} {} → ${JSON.stringify(res.body)}`).toBe(400)
      expect(res.body.data?.fields, r.key).toBeTruthy()
    }
  })

  it('a contract sent the same feature twice keeps it once', async () => {
    const res = await api(`/api/contracts/${ids.contract}`, { method: 'PATCH', token: tokens.owner, body: { featureIds: [ids.featureB, ids.featureB] } })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const rows = await db.select().from(schema.contractFeatures).where(and(eq(schema.contractFeatures.contractId, ids.contract!)))
    expect(rows.map(f => f.featureId)).toEqual([ids.featureB])
  })

  it('a feature stored without some kinds of equipment (an older row) reads as having none of them, and a PATCH adds them', async () => {
    await db.update(schema.waterFeatures).set({ equipment: { filter: null } as never }).where(eq(schema.waterFeatures.id, ids.featureB!))
    const read = await api(`/api/features/${ids.featureB}`, { token: tokens.owner })
    expect(read.status, JSON.stringify(read.body)).toBe(200)
    expect(read.body.equipment.pumps).toEqual([])
    expect(read.body).toMatchObject({ totalPumpFlowLph: 0, turnoverPerHour: null })
    const patched = await api(`/api/features/${ids.featureB}`, { method: 'PATCH', token: tokens.owner, body: { equipment: { pumps: [{ name: 'Stream pump', role: 'stream', ratedFlowLph: 6000 }] } } })
    expect(patched.status, JSON.stringify(patched.body)).toBe(200)
    expect((await api(`/api/features/${ids.featureB}`, { token: tokens.owner })).body.totalPumpFlowLph).toBe(6000)
  })
})
