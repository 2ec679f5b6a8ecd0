import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { launch, shot, signInThroughForm, VIEWPORTS, waitForHydration } from '../helpers/browser'
import { visitForTessToday } from '../helpers/visits'
import { VISIT_TYPE_LABELS, type VisitType } from '../../shared/types/schedule'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })
const nextYear = new Date().getUTCFullYear() + 1

describe('plans, contracts and the schedule in the browser', () => {
  for (const [size, viewport] of Object.entries(VIEWPORTS)) {
    it(`the owner creates a plan, signs a customer onto it, sees the visits on the board and assigns one (${size})`, async () => {
      const context = await browser.newContext({ viewport, isMobile: size === 'phone', hasTouch: size === 'phone' })
      const page = await context.newPage()
      page.on('dialog', d => d.accept())
      const planName = `Garden Fortnightly ${size}`
      const customerName = size === 'phone' ? 'Kavya Naidu' : 'Hugo Ferrant'
      const owner = await tokenFor(demo.owner)
      const customer = (await api(`/api/customers?q=${encodeURIComponent(customerName)}`, { token: owner })).body.rows[0]

      await signInThroughForm(page, demo.owner)
      await page.waitForURL(url => url.pathname === '/')
      await page.goto(`${baseUrl()}/plans/new`)
      await waitForHydration(page)
      await page.getByLabel('Plan name').fill(planName)
      await page.getByLabel(/^Price/).fill('900.00')
      // Visit 1: every two weeks from May to September, give or take 3 days (the builder's default).
      const fortnightly = 'Every 2 weeks from May to September, give or take 3 days'
      await page.getByLabel('Visit', { exact: true }).selectOption('routine')
      await page.getByText(fortnightly).waitFor()
      await page.getByRole('button', { name: 'Add a kind of visit' }).click()
      await page.locator('#t-1-type').selectOption('spring_cleanout')
      await page.locator('#t-1-duration').fill('180')
      await page.getByText(fortnightly).nth(1).waitFor()
      await page.locator('input[name="Visit 2-kind"][value="once"]').check({ force: true })
      await page.getByLabel('Visit 2 first month').selectOption('4')
      await page.getByLabel('Visit 2 last month').selectOption('4')
      await page.getByText('Once in April').waitFor()
      // The owner reads the plan in words, never the stored rule text.
      expect(await page.getByText(/FREQ=/).count()).toBe(0)
      await shot(page, `schedule-plan-form-${size}`)
      await page.getByRole('button', { name: 'Save plan' }).click()
      await page.getByRole('heading', { name: planName }).waitFor()

      await page.goto(`${baseUrl()}/contracts/new?customerId=${customer.id}`)
      const planId = (await api(`/api/plans?q=${encodeURIComponent(planName)}`, { token: owner })).body.rows[0].id
      await page.getByLabel('Plan', { exact: true }).selectOption(planId)
      await page.getByLabel('Term starts').fill(`${nextYear}-03-01`)
      await page.getByRole('button', { name: 'Sign up and schedule' }).click()
      await page.getByTestId('contract-status').filter({ hasText: 'Active' }).waitFor()
      await page.getByRole('cell', { name: 'Spring clean-out' }).waitFor()
      await shot(page, `schedule-contract-${size}`)

      // The board for the week of the contract's first routine visit.
      const contractId = new URL(page.url()).pathname.split('/').pop()
      const firstRoutine = (await api(`/api/visits?contractId=${contractId}&pageSize=50`, { token: owner })).body.rows.find((v: { visitType: string }) => v.visitType === 'routine')
      expect(firstRoutine.scheduledOn.startsWith(`${nextYear}-05`)).toBe(true)
      await page.goto(`${baseUrl()}/schedule`)
      await waitForHydration(page)
      await page.getByLabel('Go to date').fill(firstRoutine.scheduledOn)
      const card = page.getByRole('button', { name: new RegExp(`${customerName}.*Routine maintenance`) }).first()
      await card.waitFor()
      await shot(page, `schedule-board-week-${size}`)
      await card.click()
      // The planner already gave the visit a technician: the owner hands it to another.
      const techs = (await api('/api/technicians', { token: owner })).body.rows as Array<{ id: string, name: string }>
      const target = techs.find(t => t.name === 'Tess Okafor' && t.id !== firstRoutine.technicianId) ?? techs.find(t => t.id !== firstRoutine.technicianId)!
      await page.getByLabel('Technician').last().selectOption({ label: target.name })
      await page.getByRole('button', { name: 'Save' }).click()
      await page.getByRole('button', { name: new RegExp(`${customerName}.*${target.name}`) }).first().waitFor()
      if (size === 'desktop') {
        await page.getByRole('button', { name: 'Month' }).click()
        await page.getByText(/unassigned/).waitFor()
        await shot(page, 'schedule-board-month-desktop')
      }
      await context.close()
    })
  }

  it('a technician sees today in driving order on a phone', async () => {
    // Whatever the date, her day holds two stops.
    await visitForTessToday('phone-a', { latitude: 44.16, longitude: -91.36 })
    await visitForTessToday('phone-b', { latitude: 44.12, longitude: -91.30 })
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.tess)
    await page.waitForURL(url => url.pathname === '/today')
    await page.getByTestId('day-summary').waitFor()
    await page.getByTestId('stop-1').waitFor()
    const day = await api('/api/today', { token: await tokenFor(demo.tess) })
    for (const [i, s] of day.body.stops.entries()) {
      expect(await page.getByTestId(`stop-${i + 1}`).textContent()).toContain(s.customerName)
    }
    await page.getByText('In driving order from your home base.').waitFor()
    await shot(page, 'schedule-today-phone')
    await context.close()
  })

  it('a customer sees their upcoming visits', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.priya)
    await page.waitForURL(url => url.pathname === '/portal')
    await page.getByTestId('upcoming-visits').waitFor()
    // Whatever the season, the list starts with her next visit as the server knows it.
    const next = (await api('/api/visits?upcoming=true&pageSize=1', { token: await tokenFor(demo.priya) })).body.rows[0]
    expect(next, 'the demo gives her an upcoming visit').toBeTruthy()
    expect(await page.getByTestId('upcoming-visits').textContent()).toContain(VISIT_TYPE_LABELS[next.visitType as VisitType])
    await shot(page, 'schedule-portal-upcoming-phone')
    await context.close()
  })
})
