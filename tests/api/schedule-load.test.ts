// The board's load of each technician-day is read from technician_day_loads, which triggers keep
// as visits change, with the driving computed again (shared/utils/day-load.ts) after each change
// of a day's stops. After every kind of change — the planner, a PATCH move and resize, skip,
// done, a pause that cancels and a resume, a plan edit that regenerates, a day off, "plan these
// weeks again", a site's or a home's new coordinates, and a write straight in the database — the
// board's figures and the stored table must equal those computed here from the visits themselves.
// A range with more visits than one answer carries is never cut: the answer says how many.
import { sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { BOARD_VISIT_LIMIT } from '../../shared/schemas/visits'
import { dayLoad, type DayLoad, type DayLoadStop } from '../../shared/utils/day-load'
import { api, demo, DEMO_PASSWORD, tokenFor } from '../helpers/api'
import { closeTestDb, testDb } from '../helpers/billing-book'
import { hashPassword } from '../../server/utils/password'

const year = new Date().getUTCFullYear() + 1
const tag = `load-${Date.now().toString(36)}`
let companyId: string
let owner: string
let techs: Array<{ id: string, email: string }> = []
const sitesById: Record<string, string> = {}
let planId: string
const contractIds: string[] = []

type Load = DayLoad & { visits: number }

beforeAll(async () => {
  const db = testDb()
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  await db.transaction(async (tx) => {
    const [company] = await tx.insert(schema.companies).values({ name: `Loadwater Test ${tag}`, currency: 'USD', unitSystem: 'us', timeZone: 'America/Chicago' }).returning()
    companyId = company!.id
    await tx.insert(schema.users).values({ companyId, email: `owner-${tag}@loadwater.example`, name: 'Load Owner', role: 'owner', passwordHash })
    for (const [i, name] of ['Ada Reed', 'Ben Sedge'].entries()) {
      const email = `tech${i}-${tag}@loadwater.example`
      const [u] = await tx.insert(schema.users).values({ companyId, email, name, role: 'technician', passwordHash }).returning()
      await tx.insert(schema.staffProfiles).values({ userId: u!.id, capacityMinutes: 300, homeLatitude: 44.1 + i / 50, homeLongitude: -91.3 })
      techs.push({ id: u!.id, email })
    }
    // Three customers: two sites with coordinates, one without (its visit time counts, no driving).
    for (const [i, place] of [[44.15, -91.34], [44.2, -91.25], [null, null]].entries()) {
      const [cust] = await tx.insert(schema.customers).values({ companyId, name: `Load Household ${i} ${tag}`, billingLine1: `${i} Reed Row`, billingCity: 'Fenbrook' }).returning()
      const [site] = await tx.insert(schema.sites).values({ companyId, customerId: cust!.id, name: 'Garden', line1: `${i} Reed Row`, city: 'Fenbrook', latitude: place[0], longitude: place[1] }).returning()
      await tx.insert(schema.waterFeatures).values({
        companyId, customerId: cust!.id, siteId: site!.id, name: 'Pond', kind: 'water_garden',
        shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.6 }, surfaceAreaM2: 6, computedVolumeL: 3600, equipment: {} as never,
      })
      sitesById[cust!.id] = site!.id
    }
  })
  techs = techs.sort((a, b) => a.email.localeCompare(b.email))
  owner = await tokenFor(`owner-${tag}@loadwater.example`)
})
afterAll(closeTestDb)

const rowsOf = async <T>(query: ReturnType<typeof sql>) => (await testDb().execute(query)).rows as T[]

/** Each technician-day computed straight from the visits, as the board defines it. */
async function fromVisits() {
  const stops = await rowsOf<DayLoadStop & { technicianId: string, day: string, capacity: number, homeLat: number | null, homeLon: number | null }>(sql`
    select v.id, v.technician_id as "technicianId", v.scheduled_on::text as day, v.duration_minutes as "durationMinutes", s.latitude as lat, s.longitude as lon,
      coalesce(sp.capacity_minutes, 420) as capacity, sp.home_latitude as "homeLat", sp.home_longitude as "homeLon"
    from visits v join sites s on s.id = v.site_id left join staff_profiles sp on sp.user_id = v.technician_id
    where v.company_id = ${companyId} and v.technician_id is not null and v.status not in ('cancelled', 'skipped') order by v.id`)
  const days = new Map<string, typeof stops>()
  for (const s of stops) days.set(`${s.day}|${s.technicianId}`, [...(days.get(`${s.day}|${s.technicianId}`) ?? []), s])
  const out = new Map<string, Load>()
  for (const [key, list] of days) {
    const f = list[0]!
    out.set(key, { visits: list.length, ...dayLoad(list, f.homeLat != null && f.homeLon != null ? { lat: f.homeLat, lon: f.homeLon } : null, f.capacity) })
  }
  return out
}

const addDays = (d: string, n: number) => new Date(Date.parse(`${d}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10)

/** The board over every 62-day window of the visits' year, and the stored counts and minutes of every day, against the visits. */
async function expectLoadsMatchVisits(step: string) {
  const want = await fromVisits()
  const stored = await rowsOf<{ key: string, visits: number, minutes: number }>(sql`
    select day::text || '|' || technician_id as key, visits, visit_minutes as minutes from technician_day_loads where company_id = ${companyId}`)
  expect(Object.fromEntries(stored.map(r => [r.key, [r.visits, r.minutes]])), `${step}: stored counts`)
    .toEqual(Object.fromEntries([...want].map(([k, l]) => [k, [l.visits, l.visitMinutes]])))
  const seen = new Map<string, Load>()
  for (let from = `${year}-01-01`; from <= `${year}-12-31`; from = addDays(from, 62)) {
    const to = addDays(from, 61)
    const b = await api(`/api/schedule?from=${from}&to=${to}`, { token: owner })
    expect(b.status, `${step}: ${JSON.stringify(b.body)}`).toBe(200)
    for (const [day, perTech] of Object.entries(b.body.load as Record<string, Record<string, Load>>)) {
      for (const [tid, l] of Object.entries(perTech)) seen.set(`${day}|${tid}`, l)
    }
  }
  expect(Object.fromEntries(seen), `${step}: the board's load`).toEqual(Object.fromEntries(want))
  // What the board computed is stored for the next read.
  const driving = await rowsOf<{ key: string, driving: number | null }>(sql`
    select day::text || '|' || technician_id as key, driving_minutes as driving from technician_day_loads where company_id = ${companyId}`)
  for (const d of driving) expect(d.driving, `${step}: stored driving of ${d.key}`).toBe(want.get(d.key)!.drivingMinutes)
  return want
}

async function visitsOf(contractId: string) {
  return (await api(`/api/visits?contractId=${contractId}&pageSize=100`, { token: owner })).body.rows as Array<{ id: string, scheduledOn: string, technicianId: string | null, status: string, durationMinutes: number }>
}

describe('each technician-day\'s load follows every change of the visits', () => {
  it('after the planner, moves, resizes, skip, done, pause and resume, regeneration, a day off, a re-plan and new coordinates', async () => {
    const p = await api('/api/plans', {
      method: 'POST', token: owner, body: {
        name: `Load plan ${tag}`, description: 'Test plan', priceMinor: 90_000, currency: 'USD', billingCadence: 'yearly', termMonths: 12,
        templates: [
          { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY', seasonFrom: '04-01', seasonTo: '04-30', durationMinutes: 180 },
          { visitType: 'routine', rrule: 'FREQ=WEEKLY;INTERVAL=2', seasonFrom: '05-01', seasonTo: '07-31', toleranceDays: 3, durationMinutes: 60 },
        ],
      },
    })
    expect(p.status, JSON.stringify(p.body)).toBe(201)
    planId = p.body.id
    for (const customerId of Object.keys(sitesById)) {
      const features = await rowsOf<{ id: string }>(sql`select id from water_features where customer_id = ${customerId}`)
      const c = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId, planId, featureIds: features.map(f => f.id), termStart: `${year}-01-01` } })
      expect(c.status, JSON.stringify(c.body)).toBe(201)
      // The planner places each contract's visits on a technician and a day.
      expect((await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })).status).toBe(200)
      contractIds.push(c.body.id)
    }
    const placed = await expectLoadsMatchVisits('planner')
    expect(placed.size).toBeGreaterThan(5)

    const [a, b, cNoPlace] = await Promise.all(contractIds.map(visitsOf))
    const assigned = a!.filter(v => v.technicianId)
    const other = (id: string | null) => techs.find(t => t.id !== id)!.id
    // Moved by hand to another day and the other technician, then only to another technician, then resized.
    const m1 = assigned[1]!
    expect((await api(`/api/visits/${m1.id}`, { method: 'PATCH', token: owner, body: { scheduledOn: addDays(m1.scheduledOn, 1), moveReason: 'Test move', technicianId: other(m1.technicianId) } })).status).toBe(200)
    const m2 = assigned[2]!
    expect((await api(`/api/visits/${m2.id}`, { method: 'PATCH', token: owner, body: { technicianId: other(m2.technicianId) } })).status).toBe(200)
    expect((await api(`/api/visits/${assigned[3]!.id}`, { method: 'PATCH', token: owner, body: { durationMinutes: 150 } })).status).toBe(200)
    await expectLoadsMatchVisits('PATCH move and resize')

    // Skipped takes no time; done still counts.
    expect((await api(`/api/visits/${assigned[4]!.id}/skip`, { method: 'POST', token: owner, body: { reason: 'Gate locked' } })).status).toBe(200)
    const d = b!.find(v => v.technicianId)!
    expect((await api(`/api/visits/${d.id}/start`, { method: 'POST', token: owner })).status).toBe(200)
    expect((await api(`/api/visits/${d.id}/finish`, { method: 'POST', token: owner, body: {} })).status).toBe(200)
    await expectLoadsMatchVisits('skip and done')

    // A pause cancels the contract's visits; a resume brings them back.
    expect((await api(`/api/contracts/${contractIds[2]}/actions`, { method: 'POST', token: owner, body: { action: 'pause', reason: 'Away for the summer' } })).status).toBe(200)
    expect((await visitsOf(contractIds[2]!)).filter(v => v.status === 'cancelled').length).toBeGreaterThan(0)
    await expectLoadsMatchVisits('pause (cancelled visits)')
    expect((await api(`/api/contracts/${contractIds[2]}/actions`, { method: 'POST', token: owner, body: { action: 'resume' } })).status).toBe(200)
    await expectLoadsMatchVisits('resume')
    expect(cNoPlace!.length).toBeGreaterThan(0)

    // A plan edit regenerates the active contracts' visits (another rhythm and duration).
    const plan = (await api(`/api/plans/${planId}`, { token: owner })).body
    const edited = await api(`/api/plans/${planId}`, {
      method: 'PATCH', token: owner,
      body: { templates: plan.templates.map((t: Record<string, unknown>) => (t.visitType === 'routine' ? { ...t, rrule: 'FREQ=WEEKLY;INTERVAL=3', durationMinutes: 75 } : t)) },
    })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    expect(edited.body.regeneratedContracts).toBe(3)
    await expectLoadsMatchVisits('regeneration')

    // A day off over a day with visits takes the technician off them.
    const busy = (await visitsOf(contractIds[0]!)).find(v => v.technicianId && v.status === 'scheduled')!
    const off = await api(`/api/technicians/${busy.technicianId}/days-off`, { method: 'POST', token: owner, body: { from: busy.scheduledOn, reason: 'Training' } })
    expect(off.status, JSON.stringify(off.body)).toBe(201)
    expect((await api(`/api/visits/${busy.id}`, { token: owner })).body.technicianId).toBeNull()
    await expectLoadsMatchVisits('day off')

    // "Plan these weeks again" over the routine season, applied.
    const range = { from: `${year}-05-01`, to: `${year}-07-31` }
    const preview = await api('/api/schedule/replan', { method: 'POST', token: owner, body: range })
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    const applied = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...range, apply: true, token: preview.body.token } })
    expect(applied.status, JSON.stringify(applied.body)).toBe(200)
    await expectLoadsMatchVisits('re-plan applied')

    // New coordinates for a site and for a technician's home change the driving.
    const before = await fromVisits()
    const [siteA] = Object.values(sitesById)
    expect((await api(`/api/sites/${siteA}`, { method: 'PATCH', token: owner, body: { latitude: 44.4, longitude: -91.6 } })).status).toBe(200)
    expect((await api(`/api/technicians/${techs[0]!.id}`, { method: 'PATCH', token: owner, body: { homeLatitude: 43.9, homeLongitude: -91.1 } })).status).toBe(200)
    const after = await expectLoadsMatchVisits('new coordinates')
    expect([...after].some(([k, l]) => before.get(k)?.drivingMinutes !== l.drivingMinutes)).toBe(true)

    // Whoever writes the visits, even straight in the database, the load follows.
    await testDb().execute(sql`update visits set technician_id = ${techs[1]!.id}, scheduled_on = scheduled_on + 2 where company_id = ${companyId} and technician_id = ${techs[0]!.id} and status = 'scheduled' and scheduled_on < ${`${year}-06-01`}`)
    await testDb().execute(sql`delete from visits where id = (select id from visits where company_id = ${companyId} and technician_id is not null and status = 'scheduled' order by id limit 1)`)
    await expectLoadsMatchVisits('written straight in the database')
  })
})

describe('a range with more visits than one answer carries', () => {
  const week = { from: `${year}-08-02`, to: `${year}-08-08` }
  it('is never cut: the answer says how many there are, and a technician or a day picked gives every card of it', async () => {
    const [site] = Object.values(sitesById)
    const customerId = Object.keys(sitesById)[0]!
    // More visits than one answer carries in one week, spread over both technicians and every day (written straight in; the triggers keep the load).
    await testDb().execute(sql`insert into visits (company_id, customer_id, site_id, visit_type, scheduled_on, starts_at, duration_minutes, technician_id)
      select ${companyId}, ${customerId}, ${site}, 'routine', ${week.from}::date + (g % 7), now(), 10, case when g % 3 = 0 then null when g % 3 = 1 then ${techs[0]!.id}::uuid else ${techs[1]!.id}::uuid end
      from generate_series(1, ${BOARD_VISIT_LIMIT + 200}) g`)
    const [{ n }] = await rowsOf<{ n: number }>(sql`select count(*)::int as n from visits where company_id = ${companyId} and scheduled_on between ${week.from} and ${week.to} and status <> 'cancelled'`)
    expect(n).toBeGreaterThan(BOARD_VISIT_LIMIT)

    const all = await api(`/api/schedule?from=${week.from}&to=${week.to}`, { token: owner })
    expect(all.status).toBe(200)
    expect(all.body.visits).toEqual([])
    expect(all.body.tooMany).toEqual({ limit: BOARD_VISIT_LIMIT })
    expect(all.body.visitCount).toBeNull()
    expect(all.body.large).toBe(true)
    expect(all.body.unassigned).toBe(Math.floor((BOARD_VISIT_LIMIT + 200) / 3))
    // The overview still has every technician-day, with every visit counted.
    const counted = Object.values(all.body.load as Record<string, Record<string, Load>>).flatMap(Object.values).reduce((s, l) => s + l.visits, 0)
    const [{ assigned }] = await rowsOf<{ assigned: number }>(sql`select count(*)::int as assigned from visits where company_id = ${companyId} and scheduled_on between ${week.from} and ${week.to} and technician_id is not null and status not in ('cancelled', 'skipped')`)
    expect(counted).toBe(assigned)
    const over = Object.values(all.body.load[week.from] as Record<string, Load>)
    expect(over.every(l => l.over)).toBe(true)

    // One technician's week, and one day: every card, none missing.
    for (const [q, where] of [
      [`technicianId=${techs[0]!.id}`, sql`technician_id = ${techs[0]!.id}`],
      [`day=${week.from}`, sql`scheduled_on = ${week.from}`],
      [`technicianId=unassigned&day=${addDays(week.from, 3)}`, sql`technician_id is null and scheduled_on = ${addDays(week.from, 3)}`],
    ] as const) {
      const r = await api(`/api/schedule?from=${week.from}&to=${week.to}&${q}`, { token: owner })
      expect(r.status, JSON.stringify(r.body).slice(0, 300)).toBe(200)
      const [{ m }] = await rowsOf<{ m: number }>(sql`select count(*)::int as m from visits where company_id = ${companyId} and scheduled_on between ${week.from} and ${week.to} and status <> 'cancelled' and ${where}`)
      expect(r.body.tooMany, q).toBeNull()
      expect(r.body.visitCount, q).toBe(m)
      expect(r.body.visits, q).toHaveLength(m)
      expect(r.body.large).toBe(true)
    }
    // A month holding them says so too; a range beside them is small and has every card.
    const month = await api(`/api/schedule?from=${year}-07-27&to=${year}-09-06`, { token: owner })
    expect(month.body).toMatchObject({ visits: [], tooMany: { limit: BOARD_VISIT_LIMIT }, large: true })
    const before = await api(`/api/schedule?from=${year}-07-20&to=${year}-08-01`, { token: owner })
    const [{ k }] = await rowsOf<{ k: number }>(sql`select count(*)::int as k from visits where company_id = ${companyId} and scheduled_on between ${`${year}-07-20`} and ${`${year}-08-01`} and status <> 'cancelled'`)
    expect(before.body).toMatchObject({ large: false, tooMany: null, visitCount: k })
    expect(before.body.visits).toHaveLength(k)
  })

  it('checks role and ownership on the picks: another company\'s technician is not found, a day outside the range is a 400 naming it', async () => {
    const week = `from=${year}-08-02&to=${year}-08-08`
    const demoOwner = await tokenFor(demo.owner)
    // The demo company's owner cannot pick this company's technician, nor see its load.
    const foreign = await api(`/api/schedule?${week}&technicianId=${techs[0]!.id}`, { token: demoOwner })
    expect(foreign.status).toBe(404)
    const demoBoard = await api(`/api/schedule?${week}`, { token: demoOwner })
    expect(demoBoard.status).toBe(200)
    const ids = Object.values(demoBoard.body.load as Record<string, Record<string, Load>>).flatMap(Object.keys)
    expect(ids.filter(id => techs.some(t => t.id === id))).toEqual([])
    const outside = await api(`/api/schedule?${week}&day=${year}-08-09`, { token: owner })
    expect(outside.status).toBe(400)
    expect(outside.body.data.fields.day).toMatch(/inside the range/)
    expect((await api(`/api/schedule?${week}&day=nonsense`, { token: owner })).body.data.fields.day).toBeTruthy()
    expect((await api(`/api/schedule?${week}&technicianId=not-an-id`, { token: owner })).status).toBe(400)
    // A customer has no board; a technician reads it.
    expect((await api(`/api/schedule?${week}&day=${year}-08-03`, { token: await tokenFor(demo.priya) })).status).toBe(403)
    const tech = await api(`/api/schedule?${week}&technicianId=${techs[0]!.id}`, { token: await tokenFor(techs[0]!.email) })
    expect(tech.status).toBe(200)
    expect(tech.body.visits.length).toBeGreaterThan(0)
  })
})
