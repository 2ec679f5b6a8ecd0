import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'

// Technicians' own working weekdays and days off, the customer's technician on renewal, and
// regeneration through the planner. Terms are computed from the app's today (a year far enough
// on that the demo holds nothing there), never from the test machine's clock.
let owner: string
let pool: pg.Pool
let year: number
let tessId: string
/** A technician made for this file, so that their working days touch no demo visit. */
let wrenId: string
let others: string[]
const daysOff: Array<{ tech: string, id: string }> = []

/** ISO weekday (1 Monday … 7 Sunday) of a calendar date: pure date arithmetic. */
const weekday = (d: string) => new Date(`${d}T12:00:00Z`).getUTCDay() || 7
/** The first day of April of the year that is a Thursday, as MM-DD. */
const firstThursdayOfApril = (y: number) => {
  for (let d = 1; d <= 7; d++) if (weekday(`${y}-04-0${d}`) === 4) return `04-0${d}`
  throw new Error('no Thursday')
}

async function dayOff(tech: string, body: Record<string, unknown>) {
  const r = await api(`/api/technicians/${tech}/days-off`, { method: 'POST', token: owner, body })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  daysOff.push({ tech, id: r.body.dayOff.id })
  return r.body
}

async function signCustomer(label: string, planId: string, where: { latitude: number, longitude: number }) {
  const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Days Test ${label}`, kind: 'household' } })
  const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: `${label} Days Row`, city: 'Larchfield', ...where } })
  const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 1.2 } } })
  const k = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId, featureIds: [f.body.id], termStart: `${year}-01-01` } })
  expect(k.status, JSON.stringify(k.body)).toBe(201)
  const a = await api(`/api/contracts/${k.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
  expect(a.status, JSON.stringify(a.body)).toBe(200)
  return { customerId: c.body.id as string, contractId: k.body.id as string }
}

async function contractVisits(contractIds: string[]) {
  return (await pool.query(
    `select id, scheduled_on::text as day, technician_id, unplaced_reason, moved_manually from visits
     where contract_id = any($1::uuid[]) and status = 'scheduled' order by scheduled_on, id`, [contractIds])).rows as Array<{ id: string, day: string, technician_id: string | null, unplaced_reason: string | null, moved_manually: boolean }>
}

async function aprilPlan(name: string, toleranceDays: number) {
  const p = await api('/api/plans', { method: 'POST', token: owner, body: {
    name, priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12,
    templates: [{ visitType: 'routine', rrule: 'FREQ=WEEKLY', seasonFrom: firstThursdayOfApril(year), seasonTo: '04-30', toleranceDays, durationMinutes: 60 }],
  } })
  expect(p.status, JSON.stringify(p.body)).toBe(201)
  return p.body
}

beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
  const today = (await api('/api/today', { token: owner })).body.date as string
  year = Number(today.slice(0, 4)) + 3
  const wren = await api('/api/users', { method: 'POST', token: owner, body: { email: `wren-${Date.now()}@heronmere.example`, name: 'Wren Days-Test', role: 'technician', password: 'wren-long-enough-pw' } })
  expect(wren.status, JSON.stringify(wren.body)).toBe(201)
  wrenId = wren.body.id
  const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string, name: string }>
  tessId = techs.find(t => t.name === 'Tess Okafor')!.id
  others = techs.filter(t => t.id !== wrenId).map(t => t.id)
  // Everyone but Wren is on holiday for all of April of that year.
  for (const t of others) await dayOff(t, { from: `${year}-04-01`, to: `${year}-04-30`, reason: 'Holiday' })
})
afterAll(async () => {
  for (const d of daysOff) await api(`/api/technicians/${d.tech}/days-off/${d.id}`, { method: 'DELETE', token: owner })
  if (wrenId) await api(`/api/users/${wrenId}`, { method: 'PATCH', token: owner, body: { active: false } })
  await pool.end()
})

describe('technicians\' working days and days off', () => {
  it('hold through activation and "plan these weeks again"; a day off over visits takes the technician off them and lists them', async () => {
    // Wren works Monday to Wednesday; everyone else is on holiday for all of April.
    const patched = await api(`/api/technicians/${wrenId}`, { method: 'PATCH', token: owner, body: { workingDays: [3, 1, 2, 2] } })
    expect(patched.status, JSON.stringify(patched.body)).toBe(200)
    expect(patched.body.workingDays).toEqual([1, 2, 3])
    const listed = await api(`/api/technicians/${others[0]}/days-off`, { token: owner })
    expect(listed.body.rows).toContainEqual(expect.objectContaining({ from: `${year}-04-01`, to: `${year}-04-30`, reason: 'Holiday' }))

    const plan = await aprilPlan(`Weekly April ${year}`, 3)
    const signed = []
    for (let i = 0; i < 4; i++) signed.push(await signCustomer(`wd${i}`, plan.id, { latitude: 44.15 + i * 0.003, longitude: -91.34 }))
    const check = async () => {
      const rows = await contractVisits(signed.map(s => s.contractId))
      expect(rows.length).toBeGreaterThanOrEqual(4 * 3)
      for (const v of rows) {
        if (!v.technician_id) {
          expect((v.unplaced_reason ?? '').length, v.id).toBeGreaterThan(10)
          continue
        }
        expect(v.technician_id, `${v.day}: only Wren works in April`).toBe(wrenId)
        expect([1, 2, 3], `${v.day} is not one of Wren's working days`).toContain(weekday(v.day))
      }
      return rows
    }
    const rows = await check()
    expect(rows.filter(v => v.technician_id).length).toBeGreaterThan(rows.length / 2)

    const range = { from: `${year}-04-01`, to: `${year}-04-30` }
    const p = await api('/api/schedule/replan', { method: 'POST', token: owner, body: range })
    expect(p.status, JSON.stringify(p.body)).toBe(200)
    for (const m of p.body.moves as Array<{ to: { day: string, technicianId: string } | null }>) {
      if (!m.to) continue
      expect(m.to.technicianId).toBe(wrenId)
      expect([1, 2, 3]).toContain(weekday(m.to.day))
    }
    const a = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...range, apply: true, token: p.body.token } })
    expect(a.status, JSON.stringify(a.body)).toBe(200)
    const after = await check()

    // Wren takes a training day on a day that holds their visits: they lose Wren, with the reason, and are listed.
    const busy = after.find(v => v.technician_id === wrenId)!
    const onThatDay = after.filter(v => v.technician_id === wrenId && v.day === busy.day).map(v => v.id).sort()
    const { unassignedVisits, message } = await dayOff(wrenId, { from: busy.day, reason: 'Training' })
    expect(unassignedVisits.map((v: { id: string }) => v.id).sort()).toEqual(expect.arrayContaining(onThatDay))
    expect(message).toContain(`${unassignedVisits.length} visit`)
    const now = (await pool.query(`select technician_id, unplaced_reason from visits where id = any($1::uuid[])`, [onThatDay])).rows
    for (const v of now) {
      expect(v.technician_id).toBeNull()
      expect(v.unplaced_reason).toMatch(/Wren Days-Test is off \(Training\)/)
    }
    const again = await api('/api/schedule/replan', { method: 'POST', token: owner, body: range })
    for (const m of again.body.moves as Array<{ to: { day: string } | null }>) if (m.to) expect(m.to.day).not.toBe(busy.day)

    // A day off added after a preview, even on a day with none of their visits, makes that preview stale.
    const quiet = [...Array(30).keys()].map(i => `${year}-04-${String(i + 1).padStart(2, '0')}`)
      .find(d => [1, 2, 3].includes(weekday(d)) && !after.some(v => v.day === d && v.technician_id === wrenId) && d !== busy.day)!
    await dayOff(wrenId, { from: quiet, reason: 'Dentist' })
    const stale = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...range, apply: true, token: again.body.token } })
    expect(stale.status, JSON.stringify(stale.body)).toBe(409)

    // Wren stops working on one of the weekdays that holds their visits: those visits lose them, with the reason, and are listed.
    const mine = (await pool.query(`select id, extract(isodow from scheduled_on)::int as wd from visits where technician_id = $1 and status = 'scheduled'`, [wrenId])).rows as Array<{ id: string, wd: number }>
    expect(mine.length).toBeGreaterThan(0)
    const dropped = mine[0]!.wd
    const keptDays = [1, 2, 3].filter(d => d !== dropped)
    const onDropped = mine.filter(v => v.wd === dropped).map(v => v.id).sort()
    const narrower = await api(`/api/technicians/${wrenId}`, { method: 'PATCH', token: owner, body: { workingDays: keptDays } })
    expect(narrower.status, JSON.stringify(narrower.body)).toBe(200)
    expect(narrower.body.unassignedVisits.map((v: { id: string }) => v.id).sort()).toEqual(onDropped)
    expect(narrower.body.message).toContain(`${onDropped.length} visit`)
    const dayName = ['Monday', 'Tuesday', 'Wednesday'][dropped - 1]!
    const left = (await pool.query(`select technician_id, unplaced_reason from visits where id = any($1::uuid[])`, [onDropped])).rows
    for (const v of left) {
      expect(v.technician_id).toBeNull()
      expect(v.unplaced_reason).toMatch(new RegExp(`Wren Days-Test does not work on .*${dayName}`))
    }
    expect((await api(`/api/technicians/${wrenId}`, { method: 'PATCH', token: owner, body: { workingDays: keptDays } })).body.unassignedVisits).toEqual([])
  })

  it('only the owner manages days off, of their own company\'s technicians; bad input is a 400 naming the field', async () => {
    const tess = await tokenFor(demo.tess)
    const priya = await tokenFor(demo.priya)
    const ashgrove = await tokenFor(demo.ashgrove)
    const body = { from: `${year}-06-01`, reason: 'Holiday' }
    for (const token of [tess, priya, ashgrove]) {
      expect((await api(`/api/technicians/${tessId}/days-off`, { token })).status).toBe(403)
      expect((await api(`/api/technicians/${tessId}/days-off`, { method: 'POST', token, body })).status).toBe(403)
    }
    // Only technicians of the owner's own company: another user, or an id from nowhere, is not found.
    const { rows: [ownerRow] } = await pool.query(`select id from users where email = $1`, [demo.owner])
    for (const id of [ownerRow.id, '00000000-0000-4000-8000-000000000000']) {
      expect((await api(`/api/technicians/${id}/days-off`, { method: 'POST', token: owner, body })).status).toBe(404)
      expect((await api(`/api/technicians/${id}/days-off`, { token: owner })).status).toBe(404)
    }
    expect((await api('/api/technicians/not-an-id/days-off', { method: 'POST', token: owner, body })).status).toBe(400)
    const bad = [
      [{ ...body, from: 'next tuesday' }, 'from'],
      [{ ...body, from: `${year}-02-30` }, 'from'],
      [{ ...body, to: `${year}-05-01` }, 'to'],
      [{ ...body, to: `${year + 2}-06-01` }, 'to'],
      [{ from: body.from, reason: '   ' }, 'reason'],
      [{ from: body.from }, 'reason'],
    ] as const
    for (const [b, field] of bad) {
      const r = await api(`/api/technicians/${tessId}/days-off`, { method: 'POST', token: owner, body: b })
      expect(r.status, JSON.stringify(b)).toBe(400)
      expect(Object.keys(r.body.data.fields), JSON.stringify(b)).toContain(field)
    }
    for (const wd of [[], [0], [8], 'weekdays', [1.5]]) {
      const r = await api(`/api/technicians/${tessId}`, { method: 'PATCH', token: owner, body: { workingDays: wd } })
      expect(r.status, JSON.stringify(wd)).toBe(400)
      expect(Object.keys(r.body.data.fields).some(k => k.startsWith('workingDays')), JSON.stringify(r.body)).toBe(true)
    }
    const added = await dayOff(tessId, body)
    expect(added.dayOff).toMatchObject({ from: body.from, to: body.from, reason: 'Holiday' })
    expect((await api(`/api/technicians/${tessId}/days-off/${added.dayOff.id}`, { method: 'DELETE', token: tess })).status).toBe(403)
    expect((await api(`/api/technicians/${tessId}/days-off/${added.dayOff.id}`, { method: 'DELETE', token: ashgrove })).status).toBe(403)
    expect((await api(`/api/technicians/${ownerRow.id}/days-off/${added.dayOff.id}`, { method: 'DELETE', token: owner })).status).toBe(404)
    expect((await api(`/api/technicians/${tessId}/days-off/${added.dayOff.id}`, { method: 'DELETE', token: owner })).status).toBe(200)
    expect((await api(`/api/technicians/${tessId}/days-off/${added.dayOff.id}`, { method: 'DELETE', token: owner })).status).toBe(404)
  })
})

describe('renewal keeps the customer\'s technician', () => {
  it('a contract whose visits were all done by Dario renews with its visits on Dario where he has room', async () => {
    const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string, name: string, homeLatitude: number | null, homeLongitude: number | null }>
    const dario = techs.find(t => t.name === 'Dario Lindqvist')!
    const tess = techs.find(t => t.id === tessId)!
    // The site sits at Tess's home, so without the renewal's memory the planner would lean to her.
    const where = { latitude: tess.homeLatitude ?? 44.15, longitude: tess.homeLongitude ?? -91.34 }
    const plan = await api('/api/plans', { method: 'POST', token: owner, body: {
      name: `Monthly summer ${year}`, priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12,
      templates: [{ visitType: 'routine', rrule: 'FREQ=MONTHLY', seasonFrom: '06-01', seasonTo: '09-30', toleranceDays: 5, durationMinutes: 45 }],
    } })
    expect(plan.status, JSON.stringify(plan.body)).toBe(201)
    const { contractId } = await signCustomer('renew', plan.body.id, where)
    // The last term: every visit done by Dario (history written as it would stand at the term's end).
    const done = await pool.query(`update visits set technician_id = $2, status = 'done', unplaced_reason = null where contract_id = $1 and status = 'scheduled' returning id`, [contractId, dario.id])
    expect(done.rowCount).toBeGreaterThan(2)
    const r = await api(`/api/contracts/${contractId}/actions`, { method: 'POST', token: owner, body: { action: 'renew' } })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    const next = await contractVisits([r.body.id])
    expect(next.length).toBeGreaterThan(2)
    expect(next.every(v => v.day >= `${year + 1}-01-01`)).toBe(true)
    for (const v of next) expect(v.technician_id, v.day).toBe(dario.id)
  })
})

describe('regeneration after a plan edit', () => {
  it('plans the moved visits with the planner (working days and days off hold, the rest explained); a visit moved by hand stays', async () => {
    const plan = await aprilPlan(`Weekly April regen ${year}`, 3)
    // Others stay on holiday in April (first test's days off); Wren works Monday to Wednesday.
    await api(`/api/technicians/${wrenId}`, { method: 'PATCH', token: owner, body: { workingDays: [1, 2, 3] } })
    const { contractId } = await signCustomer('regen', plan.id, { latitude: 44.2, longitude: -91.3 })
    const before = await contractVisits([contractId])
    expect(before.length).toBeGreaterThanOrEqual(3)
    for (const v of before) if (v.technician_id) expect([1, 2, 3]).toContain(weekday(v.day))
    const hand = before[0]!
    const handDay = `${year}-04-28`
    const moved = await api(`/api/visits/${hand.id}`, { method: 'PATCH', token: owner, body: { technicianId: others[0], scheduledOn: handDay, moveReason: 'Customer asked' } })
    expect(moved.status, JSON.stringify(moved.body)).toBe(200)

    // Give or take 0 days: each window is its Thursday, a day Wren does not work and the others are off.
    const edit = await api(`/api/plans/${plan.id}`, { method: 'PATCH', token: owner, body: {
      templates: [{ id: plan.templates[0].id, visitType: 'routine', rrule: 'FREQ=WEEKLY', seasonFrom: firstThursdayOfApril(year), seasonTo: '04-30', toleranceDays: 0, durationMinutes: 60 }],
    } })
    expect(edit.status, JSON.stringify(edit.body)).toBe(200)
    const after = await contractVisits([contractId])
    const kept = after.find(v => v.id === hand.id)!
    expect(kept).toMatchObject({ day: handDay, technician_id: others[0], moved_manually: true })
    const rest = after.filter(v => v.id !== hand.id)
    expect(rest.length).toBeGreaterThanOrEqual(2)
    for (const v of rest) {
      expect(weekday(v.day), v.day).toBe(4)
      expect(v.technician_id, `${v.day}: nobody works that day`).toBeNull()
      expect(v.unplaced_reason ?? '', v.day).not.toBe('')
    }
  })
})
