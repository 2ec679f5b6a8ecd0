import ICAL from 'ical.js'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { visitForTessToday } from '../helpers/visits'

let owner: string
let tess: string
let priya: string
const plan = (name: string) => ({
  name, description: 'Test plan', priceMinor: 120_000, currency: 'USD', billingCadence: 'yearly', termMonths: 12,
  templates: [
    { visitType: 'spring_cleanout', rrule: 'FREQ=YEARLY;BYMONTH=4;BYDAY=MO;BYSETPOS=2', durationMinutes: 240, checklist: [{ label: 'Pumps cleaned' }] },
    { visitType: 'routine', rrule: 'FREQ=WEEKLY;INTERVAL=2;BYMONTH=5,6,7,8,9;BYDAY=TU', durationMinutes: 60 },
  ],
})
const nextYear = new Date().getUTCFullYear() + 1

beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  tess = await tokenFor(demo.tess)
  priya = await tokenFor(demo.priya)
})

async function newCustomerWithFeature(name: string) {
  const c = await api('/api/customers', { method: 'POST', token: owner, body: { name, kind: 'household' } })
  const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: '1 Test Row', city: 'Larchfield', latitude: 44.15, longitude: -91.34 } })
  const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'water_garden', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.8 } } })
  return { customerId: c.body.id as string, featureId: f.body.id as string }
}

describe('plans', () => {
  it('the owner creates a plan with visit templates; bad rules are 400 naming the field', async () => {
    const r = await api('/api/plans', { method: 'POST', token: owner, body: plan('Test Fortnightly') })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.templates.map((t: { visitType: string }) => t.visitType)).toEqual(['spring_cleanout', 'routine'])
    const bad = await api('/api/plans', { method: 'POST', token: owner, body: { ...plan('Bad'), priceMinor: 12.5, templates: [{ visitType: 'routine', rrule: 'FREQ=HOURLY', durationMinutes: 5 }] } })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toEqual(expect.arrayContaining(['priceMinor', 'templates.0.rrule', 'templates.0.durationMinutes']))
    expect((await api('/api/plans', { method: 'POST', token: tess, body: plan('Not mine') })).status).toBe(403)
  })
})

describe('visit windows on plan templates', () => {
  it('a template keeps its season, rhythm and give-or-take; an old-style rule is read as its months', async () => {
    const r = await api('/api/plans', {
      method: 'POST', token: owner, body: {
        ...plan('Window Plan'),
        templates: [
          { visitType: 'routine', rrule: 'FREQ=WEEKLY;INTERVAL=2', seasonFrom: '05-01', seasonTo: '09-30', toleranceDays: 3, durationMinutes: 60 },
          { visitType: 'water_test', rrule: 'FREQ=MONTHLY;BYMONTH=12,1,2;BYDAY=1TU', durationMinutes: 30 },
        ],
      },
    })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const [routine, winter] = r.body.templates
    expect(routine).toMatchObject({ rrule: 'FREQ=WEEKLY;INTERVAL=2', seasonFrom: '05-01', seasonTo: '09-30', toleranceDays: 3 })
    // December, January and February: the season wraps the new year.
    expect(winter).toMatchObject({ rrule: 'FREQ=MONTHLY', seasonFrom: '12-01', seasonTo: '02-29', toleranceDays: 0 })

    const { customerId, featureId } = await newCustomerWithFeature('Window Customer')
    const c = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId, planId: r.body.id, featureIds: [featureId], termStart: `${nextYear}-01-01` } })
    await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
    const visits = (await api(`/api/visits?contractId=${c.body.id}&pageSize=100`, { token: owner })).body.rows as Array<{ visitType: string, scheduledOn: string }>
    const routineDays = visits.filter(v => v.visitType === 'routine').map(v => v.scheduledOn)
    // Every 2 weeks from 1 May to 30 September is 11 occurrences (1 May + 14 days × 0…10).
    expect(routineDays).toHaveLength(11)
    for (const d of routineDays) expect(d >= `${nextYear}-05-01` && d <= `${nextYear}-09-30`, d).toBe(true)
    const winterMonths = new Set(visits.filter(v => v.visitType === 'water_test').map(v => v.scheduledOn.slice(5, 7)))
    expect([...winterMonths].sort()).toEqual(['01', '02', '12'])
  })

  it('bad windows are 400 naming the field', async () => {
    const body = (t: Record<string, unknown>) => ({ ...plan('Bad Window'), templates: [{ visitType: 'routine', rrule: 'FREQ=WEEKLY', durationMinutes: 60, ...t }] })
    const badDay = await api('/api/plans', { method: 'POST', token: owner, body: body({ seasonFrom: '04-31', seasonTo: '05-31' }) })
    expect(badDay.status).toBe(400)
    expect(badDay.body.data.fields['templates.0.seasonFrom']).toMatch(/April has no day 31/)
    const wide = await api('/api/plans', { method: 'POST', token: owner, body: body({ seasonFrom: '05-01', seasonTo: '09-30', toleranceDays: 4 }) })
    expect(wide.status).toBe(400)
    expect(wide.body.data.fields['templates.0.toleranceDays']).toMatch(/less than half/)
    const byDay = await api('/api/plans', { method: 'POST', token: owner, body: body({ rrule: 'FREQ=WEEKLY;BYDAY=TU', seasonFrom: '05-01', seasonTo: '09-30' }) })
    expect(byDay.status).toBe(400)
    expect(byDay.body.data.fields['templates.0.rrule']).toBeTruthy()
  })
})

describe('contracts and their visits', () => {
  it('activating generates the term\'s visits on working days; editing the plan regenerates only future unstarted ones', async () => {
    const p = (await api('/api/plans', { method: 'POST', token: owner, body: plan('Regenerate Me') })).body
    const { customerId, featureId } = await newCustomerWithFeature('Contract Testcase')
    const c = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId, planId: p.id, featureIds: [featureId], termStart: `${nextYear}-03-01` } })
    expect(c.status, JSON.stringify(c.body)).toBe(201)
    expect(c.body.status).toBe('draft')
    expect(c.body.termEnd).toBe(`${nextYear + 1}-02-${(nextYear + 1) % 4 === 0 ? '29' : '28'}`)
    const a = await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
    expect(a.status, JSON.stringify(a.body)).toBe(200)
    expect(a.body.contract.status).toBe('active')
    const visits = (await api(`/api/visits?contractId=${c.body.id}&pageSize=100`, { token: owner })).body.rows
    expect(visits.length).toBe(a.body.visits.inserted)
    expect(visits.filter((v: { visitType: string }) => v.visitType === 'spring_cleanout')).toHaveLength(1)
    for (const v of visits) {
      const day = new Date(`${v.scheduledOn}T12:00:00Z`).getUTCDay()
      expect(day, v.scheduledOn).toBeGreaterThanOrEqual(1)
      expect(day, v.scheduledOn).toBeLessThanOrEqual(5)
    }
    // A second activation is refused; the schedule has no duplicates.
    expect((await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })).status).toBe(409)

    // Move one visit by hand, then change the plan: the moved one stays; others follow the new rule.
    const moved = visits.find((v: { visitType: string }) => v.visitType === 'routine')
    const m = await api(`/api/visits/${moved.id}`, { method: 'PATCH', token: owner, body: { scheduledOn: `${nextYear}-05-08`, moveReason: 'Customer asked for Friday' } })
    expect(m.status, JSON.stringify(m.body)).toBe(200)
    expect(m.body.movedManually).toBe(true)
    const noReason = await api(`/api/visits/${moved.id}`, { method: 'PATCH', token: owner, body: { scheduledOn: `${nextYear}-05-09` } })
    expect(noReason.status).toBe(400)
    expect(noReason.body.data.fields.moveReason).toBeTruthy()

    // Handing a visit to a technician without changing its day also counts as by hand: the planner keeps it.
    const handed = visits.find((v: { id: string, visitType: string }) => v.visitType === 'routine' && v.id !== moved.id)
    const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string }>
    const other = techs.find(t => t.id !== handed.technicianId)!
    const h = await api(`/api/visits/${handed.id}`, { method: 'PATCH', token: owner, body: { technicianId: other.id } })
    expect(h.status, JSON.stringify(h.body)).toBe(200)
    expect(h.body).toMatchObject({ technicianId: other.id, movedManually: true, scheduledOn: handed.scheduledOn })

    const full = (await api(`/api/plans/${p.id}`, { token: owner })).body
    const edited = await api(`/api/plans/${p.id}`, {
      method: 'PATCH', token: owner,
      body: {
        templates: full.templates.map((t: { id: string, visitType: string, rrule: string, seasonFrom: string, seasonTo: string, toleranceDays: number, durationMinutes: number }) => ({
          id: t.id, visitType: t.visitType, durationMinutes: t.durationMinutes,
          ...(t.visitType === 'routine'
            ? { rrule: 'FREQ=WEEKLY;INTERVAL=2', seasonFrom: '06-01', seasonTo: '09-30', toleranceDays: 3 }
            : { rrule: t.rrule, seasonFrom: t.seasonFrom, seasonTo: t.seasonTo, toleranceDays: t.toleranceDays }),
        })),
      },
    })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    expect(edited.body.regeneratedContracts).toBe(1)
    const after = (await api(`/api/visits?contractId=${c.body.id}&pageSize=100`, { token: owner })).body.rows
    const routine = after.filter((v: { visitType: string, status: string }) => v.visitType === 'routine' && v.status !== 'cancelled')
    const keptMoved = after.find((v: { id: string }) => v.id === moved.id)
    expect(keptMoved.scheduledOn).toBe(`${nextYear}-05-08`)
    expect(after.find((v: { id: string }) => v.id === handed.id)).toMatchObject({ scheduledOn: handed.scheduledOn, technicianId: other.id })
    // The routine visits now fall in the new season, June to September.
    const followers = routine.filter((v: { id: string }) => v.id !== moved.id && v.id !== handed.id)
    expect(followers.length).toBeGreaterThan(0)
    for (const v of followers) {
      expect(v.scheduledOn >= `${nextYear}-06-01` && v.scheduledOn <= `${nextYear}-09-30`, v.scheduledOn).toBe(true)
    }
    // Nothing duplicated: one visit per key, and the count of live routine visits is what the rule yields.
    const ids = after.map((v: { id: string }) => v.id)
    expect(new Set(ids).size).toBe(ids.length)

    // Pause cancels future visits; resume brings them back.
    const paused = await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'pause', reason: 'Away' } })
    expect(paused.body.cancelledVisits).toBeGreaterThan(0)
    expect((await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'pause', reason: 'Again' } })).status).toBe(409)
    const resumed = await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'resume' } })
    expect(resumed.body.visits.rescheduled).toBe(paused.body.cancelledVisits - 0)

    // Renewal creates the next term once.
    const renewed = await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'renew' } })
    expect(renewed.status).toBe(200)
    expect(renewed.body.contract.termStart).toBe(`${nextYear + 1}-03-01`)
    expect((await api(`/api/contracts/${c.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'renew' } })).status).toBe(409)
    const audit = await api(`/api/audit?subjectId=${c.body.id}`, { token: owner })
    expect(audit.body.rows.map((r: { action: string }) => r.action)).toEqual(expect.arrayContaining(['contract.created', 'contract.activate', 'contract.pause', 'contract.resume', 'contract.renew']))
  })

  it('rejects features of another customer and bad dates with field messages', async () => {
    const p = (await api('/api/plans?pageSize=1', { token: owner })).body.rows[0]
    const a = await newCustomerWithFeature('Feature Owner A')
    const b = await newCustomerWithFeature('Feature Owner B')
    const r = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: a.customerId, planId: p.id, featureIds: [b.featureId], termStart: '2027-02-30' } })
    expect(r.status).toBe(400)
    expect(r.body.data.fields.termStart).toBeTruthy()
    const r2 = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: a.customerId, planId: p.id, featureIds: [b.featureId], termStart: '2027-03-01' } })
    expect(r2.status).toBe(400)
    expect(r2.body.data.fields.featureIds).toMatch(/belong/)
  })

  it('a customer reads only their own contracts and visits', async () => {
    const mine = await api('/api/contracts', { token: priya })
    expect(mine.body.rows.length).toBeGreaterThan(0)
    expect(mine.body.rows.every((c: { customerName: string }) => c.customerName === 'Priya Whitcombe')).toBe(true)
    const other = (await api('/api/contracts?q=Ashgrove', { token: owner })).body.rows[0]
    expect((await api(`/api/contracts/${other.id}`, { token: priya })).status).toBe(404)
    const upcoming = await api('/api/visits?upcoming=true', { token: priya })
    expect(upcoming.body.rows.length).toBeGreaterThan(0)
    expect(upcoming.body.rows.every((v: { customerName: string }) => v.customerName === 'Priya Whitcombe')).toBe(true)
    const someoneElses = (await api(`/api/visits?contractId=${other.id}&pageSize=1`, { token: owner })).body.rows[0]
    expect((await api(`/api/visits/${someoneElses.id}`, { token: priya })).status).toBe(404)
  })
})

describe('board, assignment and today', () => {
  it('the board shows visits with each technician\'s load, flags a day over capacity, and assignment works', async () => {
    const today = (await api('/api/today', { token: tess })).body.date as string
    const b = await api(`/api/schedule?from=${today}&to=${today}`, { token: owner })
    expect(b.status).toBe(200)
    expect(b.body.technicians.map((t: { name: string }) => t.name)).toEqual(expect.arrayContaining(['Tess Okafor', 'Dario Lindqvist']))
    const tessId = b.body.technicians.find((t: { name: string }) => t.name === 'Tess Okafor').id
    // Capacity: set Tess to one hour a day; her day is then over capacity.
    await api(`/api/technicians/${tessId}`, { method: 'PATCH', token: owner, body: { capacityMinutes: 60 } })
    const over = await api(`/api/schedule?from=${today}&to=${today}`, { token: owner })
    if (over.body.visits.some((v: { technicianId: string }) => v.technicianId === tessId)) expect(over.body.load[today][tessId].over).toBe(true)
    await api(`/api/technicians/${tessId}`, { method: 'PATCH', token: owner, body: { capacityMinutes: 420 } })
    expect((await api(`/api/schedule?from=${today}&to=2099-01-01`, { token: owner })).status).toBe(400)
    expect((await api('/api/schedule?from=nonsense&to=2026-01-01', { token: owner })).status).toBe(400)
  })

  it('a technician\'s day comes in driving order with legs and an expected end, and can be reordered by hand', async () => {
    // Whatever the date, her day holds at least three stops at sites a few kilometres apart.
    await visitForTessToday('order-a', { latitude: 44.16, longitude: -91.36 })
    await visitForTessToday('order-b', { latitude: 44.12, longitude: -91.30 })
    await visitForTessToday('order-c', { latitude: 44.19, longitude: -91.40 })
    const day = await api('/api/today', { token: tess })
    expect(day.status).toBe(200)
    expect(day.body.stops.length).toBeGreaterThan(1)
    expect(day.body.stops[0].leg.km).toBeGreaterThan(0)
    expect(new Date(day.body.expectedEnd).getTime()).toBeGreaterThan(new Date(day.body.stops[0].expectedArrival).getTime())
    expect(day.body.handOrdered).toBe(false)
    const ids = day.body.stops.map((s: { id: string }) => s.id)
    const reversed = [...ids].reverse()
    const r = await api('/api/today/order', { method: 'PUT', token: tess, body: { date: day.body.date, visitIds: reversed } })
    expect(r.body.stops.map((s: { id: string }) => s.id)).toEqual(reversed)
    expect(r.body.handOrdered).toBe(true)
    const back = await api('/api/today/order', { method: 'PUT', token: tess, body: { date: day.body.date, visitIds: [] } })
    expect(back.body.stops.map((s: { id: string }) => s.id)).toEqual(ids)
    const notMine = await api('/api/today/order', { method: 'PUT', token: await tokenFor(demo.dario), body: { date: day.body.date, visitIds: ids } })
    expect(notMine.status).toBe(400)
  })
})

describe('calendar feeds (RFC 5545, parsed with ical.js)', () => {
  it('a technician\'s feed has stable UIDs, zoned times and cancelled visits marked; revoking ends it', async () => {
    const created = await api('/api/calendar/feeds', { method: 'POST', token: tess })
    expect(created.status).toBe(201)
    const path = new URL(created.body.url).pathname
    const fetchFeed = async () => {
      const res = await fetch(`${baseUrl()}${path}`)
      expect(res.headers.get('content-type')).toMatch(/text\/calendar/)
      return new ICAL.Component(ICAL.parse(await res.text()))
    }
    const cal = await fetchFeed()
    const events = cal.getAllSubcomponents('vevent')
    expect(events.length).toBeGreaterThan(0)
    expect(cal.getFirstSubcomponent('vtimezone')?.getFirstPropertyValue('tzid')).toBe('America/Chicago')
    const first = events[0]!
    expect(first.getFirstProperty('dtstart')!.getParameter('tzid')).toBe('America/Chicago')
    expect(String(first.getFirstPropertyValue('dtstamp'))).toMatch(/Z$/)

    // Cancel a visit of Tess's by pausing its contract: it stays in the feed as CANCELLED, same UID.
    await visitForTessToday('feed')
    const uidsBefore = new Set((await fetchFeed()).getAllSubcomponents('vevent').map(e => String(e.getFirstPropertyValue('uid'))))
    const day = (await api('/api/today', { token: tess })).body
    const visit = await api(`/api/visits/${day.stops[0].id}`, { token: owner })
    await api(`/api/contracts/${visit.body.contractId}/actions`, { method: 'POST', token: owner, body: { action: 'pause', reason: 'Feed test' } })
    const after = (await fetchFeed()).getAllSubcomponents('vevent')
    const uidsAfter = new Set(after.map(e => String(e.getFirstPropertyValue('uid'))))
    // The paused contract's visits all stay, under their UIDs. (Only those: other test files may
    // meanwhile re-plan or reassign other visits of Tess's, which rightly leave her feed.)
    const ofContract = new Set(((await api(`/api/visits?contractId=${visit.body.contractId}&pageSize=100`, { token: owner })).body.rows as Array<{ id: string }>).map(v => `${v.id}@rillbook`))
    const kept = [...uidsBefore].filter(uid => ofContract.has(uid))
    expect(kept.length).toBeGreaterThan(0)
    for (const uid of kept) expect(uidsAfter.has(uid), uid).toBe(true)
    const cancelled = after.find(e => String(e.getFirstPropertyValue('uid')) === `${day.stops[0].id}@rillbook`)!
    expect(cancelled.getFirstPropertyValue('status')).toBe('CANCELLED')
    expect(Number(cancelled.getFirstPropertyValue('sequence'))).toBeGreaterThan(0)
    await api(`/api/contracts/${visit.body.contractId}/actions`, { method: 'POST', token: owner, body: { action: 'resume' } })

    const feed = (await api('/api/calendar/feeds', { token: tess })).body.feed
    expect((await api(`/api/calendar/feeds/${feed.id}`, { method: 'DELETE', token: tess })).status).toBe(200)
    expect((await fetch(`${baseUrl()}${path}`)).status).toBe(404)
  })

  it('a customer\'s feed holds only their own upcoming visits', async () => {
    const created = await api('/api/calendar/feeds', { method: 'POST', token: priya })
    const text = await (await fetch(`${baseUrl()}${new URL(created.body.url).pathname}`)).text()
    const events = new ICAL.Component(ICAL.parse(text)).getAllSubcomponents('vevent')
    expect(events.length).toBeGreaterThan(0)
    expect(text).not.toMatch(/Access:|Ashgrove|Lantern/)
  })
})

describe('company calendar', () => {
  it('closed days and the working week move future generated visits; bad input is 400 naming the field', async () => {
    const p = (await api('/api/plans', { method: 'POST', token: owner, body: { ...plan('Closed Day Plan'), templates: [{ visitType: 'routine', rrule: 'FREQ=WEEKLY;BYMONTH=6;BYDAY=WE', durationMinutes: 60 }] } })).body
    const { customerId, featureId } = await newCustomerWithFeature('Closed Day Customer')
    const c = (await api('/api/contracts', { method: 'POST', token: owner, body: { customerId, planId: p.id, featureIds: [featureId], termStart: `${nextYear}-03-01` } })).body
    await api(`/api/contracts/${c.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
    const before = (await api(`/api/visits?contractId=${c.id}`, { token: owner })).body.rows.map((v: { scheduledOn: string }) => v.scheduledOn)
    const firstWednesday = before[0]
    const existing = (await api('/api/company/closed-days', { token: owner })).body.rows
    const r = await api('/api/company/closed-days', { method: 'PUT', token: owner, body: { days: [...existing, { day: firstWednesday, reason: 'Test closure' }] } })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    const after = (await api(`/api/visits?contractId=${c.id}`, { token: owner })).body.rows.filter((v: { status: string }) => v.status !== 'cancelled').map((v: { scheduledOn: string }) => v.scheduledOn)
    expect(after).not.toContain(firstWednesday)
    expect(after.length).toBe(before.length)
    // Back as it was.
    await api('/api/company/closed-days', { method: 'PUT', token: owner, body: { days: existing } })
    const bad = await api('/api/company/closed-days', { method: 'PUT', token: owner, body: { days: [{ day: 'soon' }] } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields['days.0.day']).toBeTruthy()
    const noDays = await api('/api/company', { method: 'PATCH', token: owner, body: { workingDays: [] } })
    expect(noDays.status).toBe(400)
    expect(noDays.body.data.fields.workingDays).toBeTruthy()
  })
})
