import { copyFileSync, mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { localToday } from '../../shared/utils/company-time'
import { ARTIFACTS, launch, openSchedule, shot, signInThroughForm, VIEWPORTS, waitForHydration } from '../helpers/browser'

// A fixed day, far from the demo season and from whatever date the tests run on:
// Monday 2 June 2031 (the first Monday of June of a term starting 1 January 2031).
const DAY = '2031-06-02'
const DAY_WORDS = 'Mon, Jun 2'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })

const SHOTS = process.env.RILLBOOK_SHOTS_DIR
async function keepShot(page: Page, name: string) {
  await shot(page, name)
  if (SHOTS) {
    mkdirSync(SHOTS, { recursive: true })
    copyFileSync(resolve(ARTIFACTS, `${name}.png`), resolve(SHOTS, `${name}.png`))
  }
}

/** Customers with one visit each on DAY, assigned to Dario; the last is cancelled and the one before it skipped. */
async function boardDay(label: string, count: number) {
  const owner = await tokenFor(demo.owner)
  const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string, name: string }>
  const dario = techs.find(t => t.name.startsWith('Dario'))!
  const tess = techs.find(t => t.name === 'Tess Okafor')!
  const plan = await api('/api/plans', { method: 'POST', token: owner, body: { name: `Board ${label}`, priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12, templates: [{ visitType: 'routine', rrule: 'FREQ=YEARLY;BYMONTH=6;BYDAY=MO;BYSETPOS=1', durationMinutes: 60, checklist: [{ label: 'Skimmer emptied' }] }] } })
  expect(plan.status).toBe(201)
  const out: Array<{ name: string, visitId: string, contractId: string }> = []
  for (let i = 0; i < count; i++) {
    const name = `Board ${label} ${String.fromCharCode(65 + i)}`
    const c = await api('/api/customers', { method: 'POST', token: owner, body: { name, kind: 'household', contacts: [] } })
    const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: `${i + 1} Board Row`, city: 'Larchfield', latitude: 44.15 + i * 0.01, longitude: -91.34 } })
    const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 1 } } })
    const k = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: '2031-01-01' } })
    await api(`/api/contracts/${k.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
    const visit = (await api(`/api/visits?contractId=${k.body.id}`, { token: owner })).body.rows[0]
    // The planner chose a day in June; the board test needs them all on DAY, with Dario.
    const assigned = await api(`/api/visits/${visit.id}`, { method: 'PATCH', token: owner, body: { technicianId: dario.id, scheduledOn: DAY, moveReason: 'Board test day' } })
    expect(assigned.status).toBe(200)
    out.push({ name, visitId: visit.id, contractId: k.body.id })
  }
  const skipped = await api(`/api/visits/${out.at(-2)!.visitId}/skip`, { method: 'POST', token: owner, body: { reason: 'Gate locked' } })
  expect(skipped.status).toBe(200)
  const cancelled = await api(`/api/contracts/${out.at(-1)!.contractId}/actions`, { method: 'POST', token: owner, body: { action: 'cancel', reason: 'Moved away' } })
  expect(cancelled.status).toBe(200)
  return { owner, dario, tess, planned: out.slice(0, -2), skipped: out.at(-2)!, cancelled: out.at(-1)! }
}

describe('the schedule board: many visits at once, and visits that will not happen', () => {
  for (const size of Object.keys(VIEWPORTS) as Array<keyof typeof VIEWPORTS>) {
    it(`the owner selects several visits and gives them to another technician; skipped and cancelled visits say so (${size})`, async () => {
      const fx = await boardDay(size, 5)
      const { context, page } = await openSchedule(browser, size, demo.owner, DAY)
      const day = page.locator(`section[data-day="${DAY}"]`)
      await day.getByText(fx.planned[0]!.name).waitFor()

      // Skipped and cancelled visits carry a word, not only a look; they cannot be selected.
      const cancelledCard = day.getByRole('button', { name: new RegExp(`^${fx.cancelled.name}`) })
      await expect(cancelledCard.getAttribute('data-status')).resolves.toBe('cancelled')
      await expect(cancelledCard.textContent()).resolves.toContain('Cancelled')
      const skippedCard = day.getByRole('button', { name: new RegExp(`^${fx.skipped.name}`) })
      await expect(skippedCard.textContent()).resolves.toContain('Skipped')
      expect(await day.getByRole('checkbox', { name: new RegExp(`Select ${fx.cancelled.name}`) }).count()).toBe(0)
      // Dario's load counts the driving between the stops.
      await expect(day.getByTestId(`load-${fx.dario.id}`).textContent()).resolves.toMatch(/h of 7(\.5)? h \(\d+(\.\d)? h driving\)/)
      await keepShot(page, `board-statuses-${size}`)

      for (const v of fx.planned) await day.getByRole('checkbox', { name: `Select ${v.name}, Routine maintenance, ${DAY_WORDS}` }).check()
      const bar = page.getByTestId('bulk-bar')
      await bar.getByText(`${fx.planned.length} visits selected`).waitFor()
      await bar.getByLabel('Assign selected to').selectOption({ label: 'Tess Okafor' })
      await keepShot(page, `board-selected-${size}`)
      await bar.getByRole('button', { name: 'Assign' }).click()
      await page.getByTestId('bulk-note').filter({ hasText: `Assigned ${fx.planned.length} of ${fx.planned.length} visits.` }).waitFor()
      for (const v of fx.planned) await day.getByRole('button', { name: new RegExp(`${v.name}.*Tess Okafor`) }).waitFor()
      for (const v of fx.planned) {
        const saved = (await api(`/api/visits/${v.visitId}`, { token: fx.owner })).body
        expect(saved.technicianId).toBe(fx.tess.id)
        expect(saved.scheduledOn).toBe(DAY)
      }
      await keepShot(page, `board-reassigned-${size}`)

      // …and moves two of them to the next day in one action, with a reason.
      const next = page.locator('section[data-day="2031-06-03"]')
      for (const v of fx.planned.slice(0, 2)) await day.getByRole('checkbox', { name: `Select ${v.name}, Routine maintenance, ${DAY_WORDS}` }).check()
      await bar.getByLabel('Move selected to day').fill('2031-06-03')
      await bar.getByLabel('Why the selected visits move').fill('Rain forecast')
      await bar.getByRole('button', { name: 'Move' }).click()
      await page.getByTestId('bulk-note').filter({ hasText: 'Moved 2 of 2 visits.' }).waitFor()
      for (const v of fx.planned.slice(0, 2)) await next.getByText(v.name).waitFor()
      for (const v of fx.planned.slice(0, 2)) {
        const saved = (await api(`/api/visits/${v.visitId}`, { token: fx.owner })).body
        expect(saved).toMatchObject({ scheduledOn: '2031-06-03', technicianId: fx.tess.id, movedManually: true, moveReason: 'Rain forecast' })
      }

      // A day over capacity says so in words: the one visit left on DAY grows past Tess's 7 hours.
      const left = fx.planned.at(-1)!
      expect((await api(`/api/visits/${left.visitId}`, { method: 'PATCH', token: fx.owner, body: { durationMinutes: 480 } })).status).toBe(200)
      await page.reload()
      await waitForHydration(page)
      await page.getByLabel('Go to date').fill(DAY)
      await day.getByText('Over capacity').waitFor()
      await expect(day.getByTestId(`load-${fx.tess.id}`).textContent()).resolves.toContain('over')

      // The month view names its weekdays, Monday first.
      await page.getByRole('button', { name: 'Month' }).click()
      const headers = page.getByTestId('weekday-headers')
      await expect(headers.locator('[role="columnheader"]').allTextContents()).resolves.toEqual(['Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat', 'Sun'])
      await page.getByText('June 2031').waitFor()
      await keepShot(page, `board-month-${size}`)
      await context.close()
    })
  }

  it("the Today button goes to the company's today when the browser's clock is in another time zone", async () => {
    // UTC+14: for most of any day the browser's date differs from the company's (America/Chicago in the demo).
    const context = await browser.newContext({ viewport: VIEWPORTS.desktop, timezoneId: 'Pacific/Kiritimati' })
    const page = await context.newPage()
    await signInThroughForm(page, demo.owner)
    await page.waitForURL(url => url.pathname === '/')
    await page.goto(`${baseUrl()}/schedule`)
    await waitForHydration(page)
    const company = (await api('/api/company', { token: await tokenFor(demo.owner) })).body
    await page.getByLabel('Go to date').fill(DAY)
    await page.locator(`section[data-day="${DAY}"]`).waitFor()
    await page.getByRole('button', { name: 'Today' }).click()
    const today = localToday(company.timeZone)
    await page.locator(`section[data-day="${today}"]`).waitFor()
    await expect(page.getByLabel('Go to date').inputValue()).resolves.toBe(today)
    await context.close()
  })
})
