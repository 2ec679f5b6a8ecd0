import { copyFileSync, mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { api, demo, tokenFor } from '../helpers/api'
import { addDays } from '../../shared/utils/company-time'
import { allowPageErrors, ARTIFACTS, launch, openSchedule, shot, type VIEWPORTS } from '../helpers/browser'

// Steering the planner from the board: moving one visit by hand (drag on a desktop, tap then tap
// on a phone), the tray of what the planner could not place, and "plan these weeks again".
// Fixed days years away from the demo season and from whatever date the tests run on.

let browser: Browser
let pool: pg.Pool
beforeAll(async () => {
  browser = await launch()
  pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
})
afterAll(async () => {
  await browser?.close()
  await pool?.end()
})

const SHOTS = process.env.RILLBOOK_SHOTS_DIR
async function keepShot(page: Page, name: string) {
  await shot(page, name)
  if (SHOTS) {
    mkdirSync(SHOTS, { recursive: true })
    copyFileSync(resolve(ARTIFACTS, `${name}.png`), resolve(SHOTS, `${name}.png`))
  }
}

async function technicians(owner: string) {
  const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string, name: string }>
  return { dario: techs.find(t => t.name.startsWith('Dario'))!, tess: techs.find(t => t.name === 'Tess Okafor')! }
}

/** `count` customers a few hundred metres apart on a new plan whose one visit falls in [seasonFrom, seasonTo] of `year`; the contracts activated. */
async function customersOnPlan(owner: string, label: string, year: number, season: { from: string, to: string }, count: number, durationMinutes: number) {
  const plan = await api('/api/plans', { method: 'POST', token: owner, body: {
    name: `Steer ${label}`, priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12,
    templates: [{ visitType: 'routine', rrule: 'FREQ=YEARLY', seasonFrom: season.from, seasonTo: season.to, toleranceDays: 0, durationMinutes, checklist: [{ label: 'Skimmer emptied' }] }],
  } })
  expect(plan.status, JSON.stringify(plan.body)).toBe(201)
  const out: Array<{ name: string, visitId: string }> = []
  for (let i = 0; i < count; i++) {
    const name = `Steer ${label} ${String.fromCharCode(65 + i)}`
    const c = await api('/api/customers', { method: 'POST', token: owner, body: { name, kind: 'household', contacts: [] } })
    const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: `${i + 1} Steer Lane`, city: 'Larchfield', latitude: 44.15 + i * 0.003, longitude: -91.34 } })
    const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 1 } } })
    const k = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: `${year}-01-01` } })
    expect(k.status, JSON.stringify(k.body)).toBe(201)
    expect((await api(`/api/contracts/${k.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })).status).toBe(200)
    const visit = (await api(`/api/visits?contractId=${k.body.id}`, { token: owner })).body.rows[0]
    out.push({ name, visitId: visit.id })
  }
  return out
}

async function openBoard(size: keyof typeof VIEWPORTS, day: string) {
  const board = await openSchedule(browser, size, demo.owner, day)
  await board.page.locator(`section[data-day="${day}"]`).waitFor()
  return board
}

describe('moving one visit by hand on the board', () => {
  // Monday 7 June 2032 and the Tuesday after.
  const DAY = '2032-06-07'
  const NEXT = '2032-06-08'

  it('desktop: the owner drags a visit to the next day; a day over capacity is saved and warned in words', async () => {
    const owner = await tokenFor(demo.owner)
    const { dario } = await technicians(owner)
    const [a, b] = await customersOnPlan(owner, 'drag', 2032, { from: '06-01', to: '06-30' }, 2, 60)
    // Both on DAY with Dario; the second one long enough to overfill his 7.5 h on its own.
    for (const v of [a!, b!]) expect((await api(`/api/visits/${v.visitId}`, { method: 'PATCH', token: owner, body: { technicianId: dario.id, scheduledOn: DAY, moveReason: 'Test day' } })).status).toBe(200)
    expect((await api(`/api/visits/${b!.visitId}`, { method: 'PATCH', token: owner, body: { durationMinutes: 480 } })).status).toBe(200)
    const { context, page } = await openBoard('desktop', DAY)
    const from = page.locator(`section[data-day="${DAY}"] li[data-visit="${a!.visitId}"]`)
    await from.waitFor()
    // Dropped on the day's heading corner: the middle of a day may hold a technician's drop button
    // (other test files add technicians), and that button would also change the technician.
    const onTheDay = { targetPosition: { x: 8, y: 8 } }
    await from.dragTo(page.locator(`section[data-day="${NEXT}"]`), onTheDay)
    await page.getByTestId('drop-note').filter({ hasText: `Moved ${a!.name} to Tue, Jun 8 with Dario Lindqvist` }).waitFor()
    await page.locator(`section[data-day="${NEXT}"]`).getByText(a!.name).waitFor()
    const saved = (await api(`/api/visits/${a!.visitId}`, { token: owner })).body
    expect(saved).toMatchObject({ scheduledOn: NEXT, technicianId: dario.id, movedManually: true })

    // The long one dragged onto the same day: Dario's Tuesday is now over capacity, said in words.
    await page.locator(`section[data-day="${DAY}"] li[data-visit="${b!.visitId}"]`).dragTo(page.locator(`section[data-day="${NEXT}"]`), onTheDay)
    await page.getByTestId('drop-note').filter({ hasText: /day is now over capacity: .* h of 7\.5 h/ }).waitFor()
    await page.locator(`section[data-day="${NEXT}"]`).getByText('Over capacity').waitFor()
    expect((await api(`/api/visits/${b!.visitId}`, { token: owner })).body).toMatchObject({ scheduledOn: NEXT, technicianId: dario.id })
    await keepShot(page, 'board-dragged-desktop')

    // Dragged onto a technician's button on a day: that day, that technician.
    const tess = (await technicians(owner)).tess
    await page.getByTestId('drop-note').getByRole('button', { name: 'Dismiss' }).click()
    await page.locator(`section[data-day="${NEXT}"] li[data-visit="${b!.visitId}"]`).hover()
    await page.mouse.down()
    await page.mouse.move(10, 10, { steps: 5 })
    await page.getByRole('button', { name: `Put ${b!.name} on Thu, Jun 10 with Tess Okafor` }).hover()
    await page.mouse.up()
    await page.getByTestId('drop-note').filter({ hasText: `Moved ${b!.name} to Thu, Jun 10 with Tess Okafor` }).waitFor()
    expect((await api(`/api/visits/${b!.visitId}`, { token: owner })).body).toMatchObject({ scheduledOn: '2032-06-10', technicianId: tess.id })
    await context.close()
  })

  it('phone: the owner taps a visit\'s move button, then a technician on another day; the tray places a visit the planner could not', async () => {
    const owner = await tokenFor(demo.owner)
    const { dario, tess } = await technicians(owner)
    const [a, lost] = await customersOnPlan(owner, 'tap', 2032, { from: '06-01', to: '06-30' }, 2, 60)
    expect((await api(`/api/visits/${a!.visitId}`, { method: 'PATCH', token: owner, body: { technicianId: dario.id, scheduledOn: DAY, moveReason: 'Test day' } })).status).toBe(200)
    // One the planner could not place: nobody on it, and its reason.
    await pool.query(`update visits set technician_id = null, scheduled_on = $2, unplaced_reason = 'No day with room between 1 Jun and 30 Jun: the days of Dario Lindqvist and Tess Okafor are full' where id = $1`, [lost!.visitId, DAY])
    const { context, page } = await openBoard('phone', DAY)
    const tray = page.getByTestId('unplaced-tray')
    await tray.getByText(lost!.name).waitFor()
    await tray.getByText('the days of Dario Lindqvist and Tess Okafor are full').waitFor()
    await expect(page.getByTestId('unplaced-count').textContent()).resolves.toMatch(/^[1-9]\d* not placed$/)

    await page.getByRole('button', { name: `Move ${a!.name}, Routine maintenance, Mon, Jun 7` }).click()
    await page.getByTestId('move-hint').waitFor()
    await keepShot(page, 'board-picked-phone')
    await page.getByRole('button', { name: `Put ${a!.name} on Wed, Jun 9 with Tess Okafor` }).click()
    await page.getByTestId('drop-note').filter({ hasText: `Moved ${a!.name} to Wed, Jun 9 with Tess Okafor` }).waitFor()
    expect((await api(`/api/visits/${a!.visitId}`, { token: owner })).body).toMatchObject({ scheduledOn: '2032-06-09', technicianId: tess.id, movedManually: true })

    // From the tray: pick it up, put it on Thursday with Dario; it leaves the tray.
    await tray.getByRole('button', { name: 'Place it…' }).first().click()
    await page.getByRole('button', { name: `Put ${lost!.name} on Thu, Jun 10 with Dario Lindqvist` }).click()
    await page.getByTestId('drop-note').filter({ hasText: `Moved ${lost!.name} to Thu, Jun 10 with Dario Lindqvist` }).waitFor()
    await page.locator('section[data-day="2032-06-10"]').getByText(lost!.name).waitFor()
    expect(await page.getByTestId('unplaced-tray').getByText(lost!.name).count()).toBe(0)
    expect((await api(`/api/visits/${lost!.visitId}`, { token: owner })).body).toMatchObject({ scheduledOn: '2032-06-10', technicianId: dario.id, movedManually: true })
    await keepShot(page, 'board-tapped-phone')
    await context.close()
  })
})

describe('plan these weeks again, from the board', () => {
  // Two Monday-to-Sunday weeks of 2033, one pair per screen size so the two runs do not meet.
  const WEEKS = { desktop: { from: '2033-06-06', to: '2033-06-19', season: { from: '06-06', to: '06-19' }, lastWords: 'Sun, Jun 19' }, phone: { from: '2033-07-04', to: '2033-07-17', season: { from: '07-04', to: '07-17' }, lastWords: 'Sun, Jul 17' } }
  for (const size of ['phone', 'desktop'] as const) {
    it(`the owner re-plans two weeks, sees what would move and why before anything changes, then applies it (${size})`, async () => {
      const w = WEEKS[size]
      const owner = await tokenFor(demo.owner)
      const { tess } = await technicians(owner)
      const placed = await customersOnPlan(owner, `replan ${size}`, 2033, w.season, 6, 120)
      const ids = placed.map(p => p.visitId)
      // The planner placed them; now all six sit on the first Monday with Tess: 12 hours on a 7-hour day.
      // Not "moved by hand", so planning again may move them.
      await pool.query(`update visits set scheduled_on = $2, technician_id = $3, unplaced_reason = null where id = any($1::uuid[])`, [ids, w.from, tess.id])
      const snapshot = async () => (await pool.query(`select id, scheduled_on::text as day, technician_id from visits where id = any($1::uuid[]) order by id`, [ids])).rows
      const before = await snapshot()

      const { context, page } = await openBoard(size, w.from)
      await page.locator(`section[data-day="${w.from}"]`).getByText('Over capacity').waitFor()
      // Every call answers a little late, and each line of the streamed preview reaches the page
      // 300 ms after the one before, so each progress step can be seen as it comes.
      await page.route('**/api/schedule/replan', async (route) => {
        await new Promise(r => setTimeout(r, 400))
        await route.continue()
      })
      await page.evaluate(() => {
        const real = window.fetch.bind(window)
        window.fetch = async (input, init) => {
          const res = await real(input, init)
          const accept = new Headers(init?.headers).get('accept') ?? ''
          if (!String(input).includes('/api/schedule/replan') || !accept.includes('application/x-ndjson') || !res.ok) return res
          const lines = (await res.text()).split('\n').filter(Boolean)
          const body = new ReadableStream<Uint8Array>({
            async pull(controller) {
              const line = lines.shift()
              if (line === undefined) return controller.close()
              await new Promise(r => setTimeout(r, 300))
              controller.enqueue(new TextEncoder().encode(`${line}\n`))
            },
          })
          return new Response(body, { status: res.status, headers: res.headers })
        }
      })
      const requests: Array<{ from: string, to: string, apply?: boolean }> = []
      page.on('request', (r) => {
        if (r.url().endsWith('/api/schedule/replan') && r.method() === 'POST') requests.push(r.postDataJSON())
      })
      await page.getByRole('button', { name: 'Plan these weeks again' }).click()
      const panel = page.getByTestId('replan-panel')
      await expect(panel.getByLabel('First day to plan again').inputValue()).resolves.toBe(w.from)
      await panel.getByLabel('Last day to plan again').fill(w.to)
      await panel.getByRole('button', { name: 'Show what would move' }).click()
      await panel.getByTestId('replan-progress').filter({ hasText: 'Reading the schedule for these days' }).waitFor()
      await panel.getByTestId('replan-progress').filter({ hasText: /Planning \d+ of \d+ visits…/ }).waitFor()
      await expect(panel.getByRole('progressbar').count()).resolves.toBe(1)
      await panel.getByTestId('replan-count').filter({ hasText: /\d+ visits? would move/ }).waitFor()
      // One preview for both weeks: one request for the whole range, and the preview names its last day.
      expect(requests).toEqual([{ from: w.from, to: w.to }])
      await expect(panel.getByTestId('replan-count').textContent()).resolves.toContain(w.lastWords)
      const firstCount = Number((await panel.getByTestId('replan-count').textContent())!.match(/(\d+) visits? would move/)![1])
      // 12 hours of visits on a 7-hour day: at least three must go elsewhere.
      expect(firstCount).toBeGreaterThanOrEqual(3)
      expect(await panel.getByTestId('replan-move').count()).toBe(firstCount)
      await expect(panel.getByTestId('replan-move').first().textContent()).resolves.toMatch(/Steer replan .*Mon, (Jun 6|Jul 4) · Tess Okafor → .*(over capacity|nearby|evens out)/i)
      // The preview changed nothing.
      expect(await snapshot()).toEqual(before)
      await keepShot(page, `board-replan-preview-${size}`)

      // Someone changes one of these visits after the preview: applying it is refused, in words, and nothing moves.
      allowPageErrors(/status of 409 \(Conflict\) \(.*\/api\/schedule\/replan\)$/)
      expect((await api(`/api/visits/${ids[0]}`, { method: 'PATCH', token: owner, body: { durationMinutes: 110 } })).status).toBe(200)
      await panel.getByRole('button', { name: /^Apply \d+ moves?$/ }).click()
      await panel.getByTestId('replan-message').filter({ hasText: 'The schedule changed since this preview, so nothing was applied' }).waitFor()
      expect(await snapshot()).toEqual(before)
      await panel.getByRole('button', { name: 'Show a fresh preview' }).click()
      await panel.getByTestId('replan-count').filter({ hasText: /\d+ visits? would move/ }).waitFor()
      const count = Number((await panel.getByTestId('replan-count').textContent())!.match(/(\d+) visits? would move/)![1])
      expect(count).toBeGreaterThanOrEqual(3)
      requests.length = 0
      await panel.getByRole('button', { name: /^Apply \d+ moves?$/ }).click()
      await panel.getByTestId('replan-progress').filter({ hasText: `Applying ${count} move` }).waitFor()
      await panel.getByTestId('replan-applied').filter({ hasText: `Applied ${count} move` }).waitFor()
      // Applied in one call, with the preview's one token.
      expect(requests).toEqual([{ from: w.from, to: w.to, apply: true, token: expect.any(String) }])
      const after = await snapshot()
      const moved = after.filter(r => before.find(b => b.id === r.id)!.day !== r.day || before.find(b => b.id === r.id)!.technician_id !== r.technician_id)
      expect(moved.length).toBe(count)
      // The board shows each moved visit on its new day (those in the week on screen).
      for (const r of moved.filter(r => r.day <= addDays(w.from, 6))) {
        const name = placed.find(p => p.visitId === r.id)!.name
        await page.locator(`section[data-day="${r.day}"]`).getByText(name).waitFor()
      }
      await page.locator(`section[data-day="${w.from}"]`).getByText('Over capacity').waitFor({ state: 'detached' })
      await keepShot(page, `board-replan-applied-${size}`)
      await context.close()
    })
  }
})

