// The browser never loses what was typed: the customer picker reaches every customer, the
// contract form saves for one past the first page, number fields that cannot be read say so in
// place (and the visit's footer says what is not saved), impossible doses are refused at entry,
// and the owner's requests page fits a phone. Every test makes the data it needs, so it passes
// on any date.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { launch, shot, signInThroughForm, VIEWPORTS } from '../helpers/browser'
import { visitForTessToday } from '../helpers/visits'

let browser: Browser
let owner: string
const run = Date.now().toString(36)
beforeAll(async () => {
  browser = await launch()
  owner = await tokenFor(demo.owner)
})
afterAll(async () => { await browser?.close() })

async function pageAs(email: string, size: keyof typeof VIEWPORTS) {
  const context = await browser.newContext({ viewport: VIEWPORTS[size], isMobile: size === 'phone', hasTouch: size === 'phone' })
  const page = await context.newPage()
  await signInThroughForm(page, email)
  await page.waitForURL(url => url.pathname !== '/login')
  return { context, page }
}

async function open(page: Page, path: string) {
  await page.goto(`${baseUrl()}${path}`)
  await page.waitForLoadState('networkidle')
}

/** A customer whose name sorts after everyone else's, with a site and a pond; enough other customers that they are past the first 30. */
async function customerPastTheFirstPage(label: string) {
  const total = (await api('/api/customers?pageSize=1', { token: owner })).body.total as number
  for (let i = total; i < 31; i++) {
    const r = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Filler Customer ${run}-${i}`, kind: 'household' } })
    expect(r.status).toBe(201)
  }
  const name = `Zzyzx Pondside ${label} ${run}`
  const c = await api('/api/customers', { method: 'POST', token: owner, body: { name, kind: 'household' } })
  const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: '77 Far Lane', city: 'Larchfield' } })
  const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: `Back pond ${label}`, kind: 'water_garden', shape: { kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.8 } } })
  expect(f.status).toBe(201)
  const firstPage = (await api('/api/customers?sort=name&pageSize=30', { token: owner })).body.rows as Array<{ id: string }>
  expect(firstPage.some(r => r.id === c.body.id)).toBe(false)
  return { id: c.body.id as string, name, siteId: s.body.id as string, featureName: `Back pond ${label}` }
}

async function aPlan(label: string) {
  const plan = await api('/api/plans', { method: 'POST', token: owner, body: { name: `Picker plan ${label} ${run}`, priceMinor: 50_000, currency: 'USD', billingCadence: 'yearly', termMonths: 12, templates: [{ visitType: 'routine', rrule: 'FREQ=YEARLY;BYMONTH=6;BYDAY=MO;BYSETPOS=1', durationMinutes: 60, checklist: [{ label: 'Skimmer emptied' }] }] } })
  expect(plan.status).toBe(201)
  return plan.body.name as string
}

describe('the customer picker and the contract form', () => {
  for (const size of ['desktop', 'phone'] as const) {
    it(`signs up a customer past the first 30 from Contracts → New, without typing (${size})`, async () => {
      const customer = await customerPastTheFirstPage(size)
      const planName = await aPlan(size)
      const { context, page } = await pageAs(demo.owner, size)
      await open(page, '/contracts')
      await page.getByRole('link', { name: /New contract/ }).click()
      await page.waitForURL(url => url.pathname === '/contracts/new')
      await page.waitForLoadState('networkidle')

      // Nothing chosen: the message points at fields marked on the page.
      await page.getByRole('button', { name: 'Sign up and schedule' }).click()
      await page.getByText('Check the fields marked below.').waitFor()
      expect(await page.locator('.field-error').count()).toBeGreaterThan(0)
      await shot(page, `contract-form-errors-${size}`)

      // The customer is not on the first page: "Show more" until they are.
      const select = page.getByLabel('Customer', { exact: true })
      const option = select.locator('option', { hasText: customer.name })
      await page.getByText(/^Showing 30 of \d+ customers, by name\.$/).waitFor()
      for (let i = 0; i < 10 && !(await option.count()); i++) {
        const before = await select.locator('option').count()
        await page.getByRole('button', { name: /^Show \d+ more customers$/ }).click()
        await expect.poll(() => select.locator('option').count(), { timeout: 10_000 }).toBeGreaterThan(before)
      }
      expect(await option.count()).toBe(1)
      await select.selectOption(customer.id)
      // Their features load and are ticked.
      const feature = page.getByLabel(new RegExp(customer.featureName))
      await feature.waitFor()
      expect(await feature.isChecked()).toBe(true)
      const plan = page.getByLabel('Plan', { exact: true })
      await plan.selectOption(await plan.locator('option', { hasText: planName }).getAttribute('value'))
      // Every marked field is put right: nothing marked, so no message says to check one.
      expect(await page.locator('.field-error').count()).toBe(0)
      await page.getByText('Check the fields marked below.').waitFor({ state: 'hidden' })
      await shot(page, `contract-form-filled-${size}`)
      await page.getByRole('button', { name: 'Sign up and schedule' }).click()
      await page.waitForURL(url => /^\/contracts\/[0-9a-f-]{36}$/.test(url.pathname))
      await page.getByText(customer.name).first().waitFor()
      await context.close()
    })
  }

  it('finds a customer past the first 30 by searching on the server, on the invoice form too', async () => {
    const customer = await customerPastTheFirstPage('search')
    const { context, page } = await pageAs(demo.owner, 'desktop')
    for (const path of ['/contracts/new', '/invoices/new']) {
      await open(page, path)
      await page.getByLabel('Find the customer').fill(`Zzyzx Pondside search ${run}`)
      const option = page.getByLabel('Customer', { exact: true }).locator('option', { hasText: customer.name })
      await option.waitFor({ state: 'attached' })
      await page.getByText(/1 customer match/).waitFor()
      await page.getByLabel('Customer', { exact: true }).selectOption(customer.id)
      if (path === '/contracts/new') await page.getByLabel(new RegExp(customer.featureName)).waitFor()
      await shot(page, `picker-search-${path.split('/')[1]}-desktop`)
    }
    await context.close()
  })
})

describe('number fields that cannot be read say so', () => {
  it('on the visit page: letters in pH are marked and the footer says not saved; a negative dose is refused', async () => {
    const v = await visitForTessToday(`letters-${run}`)
    const { context, page } = await pageAs(demo.tess, 'phone')
    await open(page, `/visits/${v.visitId}`)
    await page.getByRole('button', { name: /Start the visit/ }).click()
    await page.getByTestId('visit-status').filter({ hasText: 'Under way' }).waitFor()
    await page.getByRole('button', { name: 'Add a water test' }).click()
    const ph = page.getByLabel('Test 1: pH', { exact: true })
    await ph.fill('9.6')
    await page.getByTestId('save-state').filter({ hasText: 'All saved' }).waitFor({ timeout: 20_000 })
    await ph.fill('abc')
    await page.locator('.field-error', { hasText: '“abc” is not a number' }).waitFor()
    expect(await ph.getAttribute('aria-invalid')).toBe('true')
    const state = page.getByTestId('save-state')
    await expect.poll(() => state.textContent()).toMatch(/Not saved/)
    expect(await page.getByTestId('save-problems').textContent()).toMatch(/water test 1, pH: “abc” is not a number/)
    // It stays "not saved" after the record has been sent.
    await page.waitForTimeout(1500)
    expect(await state.textContent()).toMatch(/Not saved/)
    await shot(page, 'visit-letters-in-ph-phone')
    // Finishing is refused with the reason.
    await page.getByRole('button', { name: 'Finish visit' }).click()
    await page.getByTestId('visit-note').filter({ hasText: /Not finished: fix what is marked first/ }).waitFor()

    // A dose of −5 is refused at entry and never joins the list.
    await page.getByLabel('Test koi pond: product').selectOption({ index: 1 })
    await page.getByLabel('Test koi pond: amount').fill('-5')
    await page.getByLabel('Test koi pond: unit').fill('kg')
    await page.getByRole('button', { name: 'Record', exact: true }).click()
    await page.getByText('Amount: Must be more than 0').waitFor()
    expect(await page.getByTestId(`doses-${v.featureId}`).locator('li').count()).toBe(0)
    await page.getByLabel('Test koi pond: amount').fill('lots')
    await page.getByRole('button', { name: 'Record', exact: true }).click()
    await page.getByText('Amount: “lots” is not a number').waitFor()
    await page.getByLabel('Test koi pond: top-up').fill('ten')
    await page.getByRole('button', { name: 'Record top-up' }).click()
    await page.getByText('Top-up: “ten” is not a number').waitFor()
    await shot(page, 'visit-bad-dose-phone')

    // Fixing pH clears the mark, a good dose is recorded and everything saves.
    await ph.fill('7.4')
    await page.getByLabel('Test koi pond: amount').fill('2')
    await page.getByRole('button', { name: 'Record', exact: true }).click()
    await expect.poll(() => page.getByTestId(`doses-${v.featureId}`).locator('li').count()).toBe(1)
    await state.filter({ hasText: 'All saved' }).waitFor({ timeout: 20_000 })
    expect(await page.locator('.field-error', { hasText: '“abc”' }).count()).toBe(0)
    const saved = await api(`/api/visits/${v.visitId}/record`, { token: await tokenFor(demo.tess) })
    expect(saved.body.readings[0].pH).toBe(7.4)
    expect(saved.body.doses.map((d: { amount: number }) => d.amount)).toEqual([2])
    await context.close()
  })

  for (const size of ['phone', 'desktop'] as const) {
    it(`letters in a pond size are marked on the feature form and nothing is saved (${size})`, async () => {
      const customer = await customerPastTheFirstPage(`size-${size}`)
      const { context, page } = await pageAs(demo.owner, size)
      await open(page, `/features/new?siteId=${customer.siteId}`)
      await page.getByLabel('Name', { exact: true }).fill('Letters pond')
      await page.getByLabel('Length (ft)').fill('ten')
      await page.getByLabel('Width (ft)').fill('6')
      await page.getByLabel('Depth (ft)').fill('2')
      await page.getByRole('button', { name: 'Save feature' }).click()
      await page.getByText('“ten” is not a number').waitFor()
      await page.getByText('Check the fields marked below.').waitFor()
      expect(new URL(page.url()).pathname).toBe('/features/new')
      await page.getByText('“ten” is not a number').scrollIntoViewIfNeeded()
      await shot(page, `feature-letters-${size}`)
      await page.getByLabel('Length (ft)').fill('10')
      await page.getByRole('button', { name: 'Save feature' }).click()
      await page.getByRole('heading', { level: 1, name: 'Letters pond' }).waitFor()
      await context.close()
    })
  }

  it('letters in the portal\'s dosing helper get a message', async () => {
    const { context, page } = await pageAs(demo.priya, 'phone')
    await page.getByTestId('portal-feature').first().click()
    await page.getByRole('heading', { name: 'Dosing helper' }).waitFor()
    await page.getByLabel('Pond salt').check()
    await page.getByLabel('Salt now (%)').fill('a little')
    await page.getByText('“a little” is not a number').waitFor()
    await page.getByText('Fix the number marked above to see how much to add.').waitFor()
    expect(await page.getByTestId('dose-result').count()).toBe(0)
    await page.getByText('“a little” is not a number').scrollIntoViewIfNeeded()
    await shot(page, 'portal-dosing-letters-phone')
    await page.getByLabel('Dechlorinator, after topping up with tap water').check()
    await page.getByLabel(/How much tap water did you add/).fill('lots')
    await page.getByText('“lots” is not a number').waitFor()
    await page.getByLabel(/How much tap water did you add/).fill('50')
    await page.getByTestId('dose-result').waitFor()
    await context.close()
  })
})

describe('the owner\'s requests page', () => {
  it('fits a 390 px phone and has wide booking fields on a desktop', async () => {
    const priya = await tokenFor(demo.priya)
    const site = (await api('/api/sites', { token: priya })).body.rows[0]
    const description = `Water is dropping by the falls every day, a long description that must wrap on a phone (${run})`
    const created = await api('/api/requests', { method: 'POST', token: priya, body: { siteId: site.id, kind: 'leak', description, preferredDates: [] } })
    expect(created.status).toBe(201)
    for (const size of ['phone', 'desktop'] as const) {
      const { context, page } = await pageAs(demo.owner, size)
      await open(page, `/requests?open=${created.body.id}`)
      await page.getByRole('heading', { name: /Leak or water loss/ }).waitFor()
      const width = await page.evaluate(() => document.documentElement.scrollWidth)
      if (size === 'phone') expect(width).toBeLessThanOrEqual(390)
      else expect(width).toBeLessThanOrEqual(VIEWPORTS.desktop.width)
      for (const label of ['Day', 'Start', 'Minutes', 'Technician']) {
        const box = await page.getByLabel(label, { exact: true }).boundingBox()
        expect(box!.width, `${label} on ${size}`).toBeGreaterThan(size === 'phone' ? 280 : 180)
      }
      await shot(page, `requests-${size}`)
      await context.close()
    }
  })
})
