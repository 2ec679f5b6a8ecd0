import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'

// "Plan these weeks again" over two weeks as one plan: its progress streamed as JSON lines, one
// preview and one token for the whole range, and a visit free to cross from one week into the next.
// Fixed days in June 2035, far from the demo season and from whatever date the tests run on:
// Monday 4 June to Sunday 17 June 2035.
const RANGE = { from: '2035-06-04', to: '2035-06-17' }
const FIRST_WEEK_END = '2035-06-10'
/** Friday of the first week: where every test visit is put before planning again. */
const CROWDED_DAY = '2035-06-08'

let owner: string
let pool: pg.Pool
const ids: string[] = []
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
  const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string, name: string }>
  const tess = techs.find(t => t.name === 'Tess Okafor')!
  // Windows from Friday 8 June to Tuesday 12 June: Friday is the first week's one working day in
  // them (the demo's technicians work Monday to Friday), Monday and Tuesday are the second's.
  // Visits of 4 hours: a technician's day (7 to 7.5 hours) holds one. Two more visits than there
  // are technicians, so at least two can only go into the second week, where there is room.
  const count = techs.length + 2
  const plan = await api('/api/plans', { method: 'POST', token: owner, body: {
    name: 'Replan across weeks', priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12,
    templates: [{ visitType: 'routine', rrule: 'FREQ=YEARLY', seasonFrom: '06-08', seasonTo: '06-12', toleranceDays: 0, durationMinutes: 240, checklist: [{ label: 'Skimmer emptied' }] }],
  } })
  expect(plan.status, JSON.stringify(plan.body)).toBe(201)
  for (let i = 0; i < count; i++) {
    const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Across Weeks ${i}`, kind: 'household', contacts: [] } })
    const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: `${i + 1} Crossing Row`, city: 'Larchfield', latitude: 44.15 + i * 0.002, longitude: -91.34 } })
    const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 1 } } })
    const k = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: '2035-01-01' } })
    expect(k.status, JSON.stringify(k.body)).toBe(201)
    expect((await api(`/api/contracts/${k.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })).status).toBe(200)
    ids.push((await api(`/api/visits?contractId=${k.body.id}`, { token: owner })).body.rows[0].id)
  }
  // All on the first Friday with Tess, as if planned there (not moved by hand, so they may move).
  await pool.query(`update visits set scheduled_on = $2, technician_id = $3, unplaced_reason = null where id = any($1::uuid[])`, [ids, CROWDED_DAY, tess.id])
})
afterAll(async () => {
  await pool?.end()
})

const snapshot = async () => (await pool.query(`select id, scheduled_on::text as day, technician_id from visits where id = any($1::uuid[]) order by id`, [ids])).rows

/** POSTs asking for a stream; every JSON line of the answer, in order. */
async function streamed(body: unknown, token = owner) {
  const res = await fetch(`${baseUrl()}/api/schedule/replan`, {
    method: 'POST', body: JSON.stringify(body),
    headers: { 'authorization': `Bearer ${token}`, 'content-type': 'application/json', 'accept': 'application/x-ndjson' },
  })
  const text = await res.text()
  return { status: res.status, type: res.headers.get('content-type') ?? '', text, lines: res.ok ? text.trim().split('\n').map(l => JSON.parse(l)) : [] }
}

type Move = { visitId: string, from: { day: string, technicianId: string } | null, to: { day: string, technicianId: string } | null }

describe('plan these weeks again, two weeks as one plan', () => {
  it('streams its progress and ends with the same preview the plain answer gives', async () => {
    const before = await snapshot()
    const s = await streamed(RANGE)
    expect(s.status, s.text).toBe(200)
    expect(s.type).toMatch(/^application\/x-ndjson/)
    const progress = s.lines.slice(0, -1) as Array<{ stage: string, done: number, total: number }>
    expect(progress[0]).toEqual({ stage: 'reading', done: 0, total: 0 })
    const planning = progress.filter(p => p.stage === 'planning')
    expect(planning.length).toBeGreaterThan(0)
    for (let i = 1; i < planning.length; i++) expect(planning[i]!.done).toBeGreaterThanOrEqual(planning[i - 1]!.done)
    expect(planning.at(-1)!.done).toBe(planning.at(-1)!.total)
    // Every test visit is one the planner plans again.
    expect(planning.at(-1)!.total).toBeGreaterThanOrEqual(ids.length)
    const last = s.lines.at(-1)
    const plain = await api('/api/schedule/replan', { method: 'POST', token: owner, body: RANGE })
    expect(plain.status).toBe(200)
    expect(last).toEqual({ preview: plain.body })
    expect(await snapshot()).toEqual(before)
  })

  it('a visit moves from the full first week into the second, one token applies all the moves, and a stale token applies none', async () => {
    const before = await snapshot()
    const p = await api('/api/schedule/replan', { method: 'POST', token: owner, body: RANGE })
    expect(p.status, JSON.stringify(p.body)).toBe(200)
    const mine = (p.body.moves as Move[]).filter(m => ids.includes(m.visitId))
    // One 4-hour visit per technician-day: the first week's Friday cannot hold them all; Monday and Tuesday can.
    expect(mine.every(m => m.to !== null), JSON.stringify(mine)).toBe(true)
    const intoSecondWeek = mine.filter(m => m.from!.day <= FIRST_WEEK_END && m.to!.day > FIRST_WEEK_END)
    expect(intoSecondWeek.length).toBeGreaterThanOrEqual(2)
    for (const m of mine) expect(m.to!.day >= '2035-06-08' && m.to!.day <= '2035-06-12', m.visitId).toBe(true)

    // Someone changes one visit after the preview: applying is refused and nothing at all moves.
    expect((await api(`/api/visits/${ids[0]}`, { method: 'PATCH', token: owner, body: { durationMinutes: 235 } })).status).toBe(200)
    const stale = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...RANGE, apply: true, token: p.body.token } })
    expect(stale.status).toBe(409)
    expect(await snapshot()).toEqual(before)

    const fresh = await api('/api/schedule/replan', { method: 'POST', token: owner, body: RANGE })
    const applied = await api('/api/schedule/replan', { method: 'POST', token: owner, body: { ...RANGE, apply: true, token: fresh.body.token } })
    expect(applied.status, JSON.stringify(applied.body)).toBe(200)
    expect(applied.body.moves).toEqual(fresh.body.moves)
    const after = await snapshot()
    for (const m of (fresh.body.moves as Move[]).filter(x => ids.includes(x.visitId))) {
      expect(after.find(r => r.id === m.visitId), m.visitId).toMatchObject({ day: m.to!.day, technician_id: m.to!.technicianId })
    }
    expect(after.some(r => r.day > FIRST_WEEK_END)).toBe(true)
    // A moved visit's start time follows its new day.
    const movedIds = (fresh.body.moves as Move[]).map(m => m.visitId).filter(id => ids.includes(id))
    const starts = (await pool.query(`select scheduled_on::text as day, starts_at from visits where id = any($1::uuid[])`, [movedIds])).rows
    expect(starts.length).toBeGreaterThan(0)
    for (const r of starts) expect(Math.abs(new Date(r.starts_at).getTime() - Date.parse(`${r.day}T12:00:00Z`))).toBeLessThan(86_400_000)
  })

  it('asked for a stream, bad input is still a plain 400 naming the field and a technician a plain 403', async () => {
    const bad = await streamed({ from: RANGE.from, to: '2035-01-01' })
    expect(bad.status).toBe(400)
    expect(bad.type).toMatch(/json/)
    expect(JSON.parse(bad.text).data.fields.to).toMatch(/before the first/)
    const long = await streamed({ from: '2035-01-01', to: '2035-12-31' })
    expect(long.status).toBe(400)
    expect(JSON.parse(long.text).data.fields.to).toMatch(/at most 183 days/)
    const tess = await tokenFor(demo.tess)
    expect((await streamed(RANGE, tess)).status).toBe(403)
  })

  it('half a year of weekly visits: progress in steps while the planner works, the first line before the plan is done', async () => {
    // 16 customers with a weekly visit all through 2036; the range is 26 weeks of it (about 416 visits).
    const plan = await api('/api/plans', { method: 'POST', token: owner, body: {
      name: 'Replan weekly', priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12,
      templates: [{ visitType: 'routine', rrule: 'FREQ=WEEKLY', seasonFrom: '01-01', seasonTo: '12-31', toleranceDays: 2, durationMinutes: 30, checklist: [{ label: 'Skimmer emptied' }] }],
    } })
    expect(plan.status, JSON.stringify(plan.body)).toBe(201)
    for (let i = 0; i < 16; i++) {
      const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Weekly Replan ${i}`, kind: 'household', contacts: [] } })
      const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: `${i + 1} Weekly Row`, city: 'Larchfield', latitude: 44.1 + i * 0.004, longitude: -91.3 } })
      const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 1 } } })
      const k = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: '2036-01-01' } })
      expect(k.status, JSON.stringify(k.body)).toBe(201)
      expect((await api(`/api/contracts/${k.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })).status).toBe(200)
    }
    const res = await fetch(`${baseUrl()}/api/schedule/replan`, {
      method: 'POST', body: JSON.stringify({ from: '2036-03-03', to: '2036-08-30' }),
      headers: { 'authorization': `Bearer ${owner}`, 'content-type': 'application/json', 'accept': 'application/x-ndjson' },
    })
    expect(res.status).toBe(200)
    const reader = res.body!.pipeThrough(new TextDecoderStream()).getReader()
    const chunks: string[] = []
    for (;;) {
      const { value, done } = await reader.read()
      if (done) break
      chunks.push(value)
    }
    // The answer came in pieces, the first before the preview was ready.
    expect(chunks.length).toBeGreaterThan(1)
    expect(chunks[0]).not.toContain('"preview"')
    const lines = chunks.join('').trim().split('\n').map(l => JSON.parse(l))
    expect(lines.at(-1).preview.token).toMatch(/^[0-9a-f]{40}$/)
    const planning = lines.filter(l => l.stage === 'planning') as Array<{ done: number, total: number }>
    const total = planning.at(-1)!.total
    expect(total).toBeGreaterThan(400)
    expect(planning.at(-1)!.done).toBe(total)
    // PLANNER_STEP_VISITS (250) visits a step: one report on the way at least.
    expect(planning.map(p => p.done)).toContain(250)
  })
})
