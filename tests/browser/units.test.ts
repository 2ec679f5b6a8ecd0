import { mkdirSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { api, demo, tokenFor, uniqueEmail, baseUrl } from '../helpers/api'
import { launch, signInThroughForm, VIEWPORTS, waitForHydration } from '../helpers/browser'
import { visitForTessToday } from '../helpers/visits'
import { waitForMail } from '../helpers/mail'
import { foreignUnits } from '../helpers/units-scan'

// Every figure a person reads is in the company's units (PRODUCT.md, "Advice that does no harm").
// A technician types a test in the company's units on the visit page; the page, the owner's
// water check, the range editor and the customer's portal then show only that system's units.

const SHOTS = '/tmp/h3-shots'
mkdirSync(SHOTS, { recursive: true })

let browser: Browser
let owner: string
beforeAll(async () => {
  browser = await launch()
  owner = await tokenFor(demo.owner)
})
afterAll(async () => {
  // Other tests read the demo company as seeded (US units).
  await api('/api/company', { method: 'PATCH', token: owner, body: { unitSystem: 'us' } })
  await browser?.close()
})

const visibleText = (page: Page) => page.locator('body').innerText()

/** What a person reads in a part of the page. */
const scannedText = (page: Page, selector = 'body') => page.locator(selector).first().innerText()

/** The scenario of issue 14: a koi pond at 26 °C (78.8 °F), pH 8.2, total ammonia 2.0 mg/L, KH 90 mg/L. */
const TEST_VALUES = {
  us: { temperature: '78.8', topUp: '1500', temperatureUnit: '°F', volumeUnit: 'US gal' },
  metric: { temperature: '26', topUp: '5678', temperatureUnit: '°C', volumeUnit: 'L' },
} as const

async function customerLogin(customerId: string, label: string) {
  const email = uniqueEmail(`units-${label}`)
  const password = `units-${label}-long-password`
  const made = await api('/api/users', { method: 'POST', token: owner, body: { email, name: `Units ${label}`, role: 'customer', customerId, password } })
  expect(made.status, JSON.stringify(made.body)).toBe(201)
  return { email, password }
}

async function shoot(page: Page, name: string) {
  await page.screenshot({ path: `${SHOTS}/${name}.png`, fullPage: true })
}

for (const system of ['us', 'metric'] as const) {
  describe(`a ${system === 'us' ? 'US' : 'metric'} company`, () => {
    beforeAll(async () => {
      const set = await api('/api/company', { method: 'PATCH', token: owner, body: { unitSystem: system } })
      expect(set.status).toBe(200)
    })

    let typed: Awaited<ReturnType<typeof visitForTessToday>> | null = null
    it('the technician types the test in the company\'s units and the visit page, the water check and the portal show only them', async () => {
      const v = await visitForTessToday(`units-${system}`)
      typed = v
      const t = TEST_VALUES[system]
      const login = await customerLogin(v.customerId, system)

      for (const [viewport, size] of Object.entries(VIEWPORTS)) {
        const context = await browser.newContext({ viewport: size, ...(viewport === 'phone' && { isMobile: true, hasTouch: true }) })
        const page = await context.newPage()
        await signInThroughForm(page, demo.tess)
        await page.waitForURL(url => url.pathname === '/today')
        await page.goto(`${baseUrl()}/visits/${v.visitId}`)
        await waitForHydration(page)
        if (viewport === 'phone') {
          await page.getByRole('button', { name: /Start the visit/ }).click()
          await page.getByTestId('visit-status').filter({ hasText: 'Under way' }).waitFor()
          await page.getByRole('button', { name: 'Add a water test' }).click()
          await page.getByLabel(`Test 1: Water temperature (${t.temperatureUnit})`, { exact: true }).fill(t.temperature)
          await page.getByLabel('Test 1: pH', { exact: true }).fill('8.2')
          await page.getByLabel(/^Test 1: Total ammonia/).fill('2.0')
          await page.getByLabel(/^Test 1: KH/).fill('90')
          // A limit is quoted in the unit typed, and names the field as the form labels it.
          await page.getByLabel(`Test 1: Water temperature (${t.temperatureUnit})`, { exact: true }).fill(system === 'us' ? '120' : '50')
          await page.getByText(system === 'us' ? 'Water temperature above 113 °F is not plausible' : 'Water temperature above 45 °C is not plausible').first().waitFor()
          await page.getByLabel(`Test 1: Water temperature (${t.temperatureUnit})`, { exact: true }).fill(t.temperature)
          await page.getByLabel('Test koi pond: top-up').fill(t.topUp)
          await page.getByRole('button', { name: 'Record top-up' }).click()
          await page.getByTestId('save-state').filter({ hasText: 'All saved' }).waitFor({ timeout: 20_000 })
        }
        else {
          await page.getByLabel(`Test 1: Water temperature (${t.temperatureUnit})`, { exact: true }).waitFor()
        }
        await page.getByText(/Un-ionized ammonia [\d.]+ mg\/L as NH3/).first().waitFor()
        const text = await visibleText(page)
        expect(text).toContain(t.temperatureUnit)
        expect(text).toContain(t.volumeUnit)
        expect(foreignUnits(await scannedText(page), system), 'units of the other system on the visit page').toEqual([])
        // Wherever a chemical is dosed, the cautions of handling it are on the page.
        expect(text).toMatch(/gloves and eye protection/i)
        expect(text).toMatch(/never mix/i)
        await shoot(page, `visit-${system}-${viewport}`)

        // The owner's water check on the feature page, the same test.
        await page.goto(`${baseUrl()}/features/${v.featureId}`)
        await waitForHydration(page)
        await page.getByLabel(`Water temperature (${t.temperatureUnit})`, { exact: true }).fill(t.temperature)
        await page.getByLabel('pH', { exact: true }).fill('8.2')
        await page.getByLabel(/^Total ammonia/).fill('2.0')
        await page.getByLabel(/^KH/).fill('90')
        await page.getByLabel(/^Top-up today/).fill(t.topUp)
        await page.getByRole('button', { name: 'Check', exact: true }).click()
        await page.getByTestId('dose-inputs').first().waitFor()
        const checkBox = page.locator('section', { has: page.getByRole('heading', { name: 'Check a water test' }) })
        const check = await checkBox.innerText()
        // The inputs are labelled figures, never the engine's raw keys.
        expect(check).not.toMatch(/volumeL|currentTan|MgL|topUpLitres/)
        expect(check).toMatch(new RegExp(`Volume [\\d,]+ ${t.volumeUnit}`))
        await checkBox.evaluate(el => el.setAttribute('data-scan', 'water-check'))
        expect(foreignUnits(await scannedText(page, '[data-scan="water-check"]'), system), 'units of the other system in the water check').toEqual([])
        expect(check).toMatch(/gloves and eye protection/i)
        await page.getByTestId('dose-inputs').first().scrollIntoViewIfNeeded()
        await shoot(page, `water-check-${system}-${viewport}`)

        // The customer's portal: the feature card and its page.
        const customer = await browser.newContext({ viewport: size, ...(viewport === 'phone' && { isMobile: true, hasTouch: true }) })
        const cp = await customer.newPage()
        await signInThroughForm(cp, login.email, login.password)
        await cp.waitForURL(url => url.pathname === '/portal')
        await cp.getByTestId('portal-feature').first().waitFor()
        const home = await visibleText(cp)
        expect(home).toContain(t.volumeUnit)
        expect(foreignUnits(home, system), 'units of the other system on the portal home').toEqual([])
        await cp.getByTestId('portal-feature').first().click()
        await cp.getByRole('heading', { name: 'Dosing helper' }).waitFor()
        await cp.locator('[data-chart="temperature"] [role="img"]').first().waitFor()
        const card = await visibleText(cp)
        expect(foreignUnits(card, system), 'units of the other system on the portal feature page').toEqual([])
        expect(await cp.locator('[data-chart="temperature"] [role="img"]').first().getAttribute('aria-label')).toContain(t.temperatureUnit)
        // The lines draw with a short animation; the screenshot waits for it.
        await cp.waitForTimeout(800)
        await shoot(cp, `portal-feature-${system}-${viewport}`)
        await customer.close()
        await context.close()
      }
    })

    // The report e-mail is worded by the server (services/visit-report).
    it('the report e-mail of that visit carries only the company\'s units', async () => {
      expect(typed, 'the visit of the test above').not.toBeNull()
      const done = await api(`/api/visits/${typed!.visitId}/finish`, { method: 'POST', token: await tokenFor(demo.tess), body: {} })
      expect(done.status, JSON.stringify(done.body)).toBe(200)
      const mail = await waitForMail(m => m.to.includes(typed!.reportTo))
      expect(mail.text).toContain(TEST_VALUES[system].temperatureUnit)
      expect(foreignUnits(mail.text, system), 'units of the other system in the report e-mail').toEqual([])
    })

    it('the range editor on the feature page shows the bounds in the company\'s units and saves them in SI', async () => {
      const v = await visitForTessToday(`ranges-${system}`)
      const context = await browser.newContext({ viewport: VIEWPORTS.desktop })
      const page = await context.newPage()
      await signInThroughForm(page, demo.owner)
      await page.waitForURL(url => url.pathname === '/')
      await page.goto(`${baseUrl()}/features/${v.featureId}`)
      await waitForHydration(page)
      const heading = system === 'us' ? 'Water temperature (°F)' : 'Water temperature (°C)'
      // The range table beside the form is in the same units.
      const row = await page.locator('tr[data-range="temperatureC"]').innerText()
      expect(row).toContain(heading)
      await page.getByRole('button', { name: 'Override ranges' }).click()
      const box = page.getByLabel(`${heading}: Watch above`, { exact: true })
      const before = (await api(`/api/features/${v.featureId}`, { token: owner })).body.ranges.temperatureC.watchAbove as number
      // The box shows the stored °C bound in the company's unit (1.8 × °C + 32 for °F; NIST SP 811).
      expect(Number(await box.inputValue())).toBeCloseTo(system === 'us' ? before * 1.8 + 32 : before, 1)
      await box.fill(system === 'us' ? '86' : '30')
      await page.getByRole('button', { name: 'Save overrides' }).click()
      await page.getByText('Saved for this feature.').waitFor()
      const after = (await api(`/api/features/${v.featureId}`, { token: owner })).body
      // 86 °F = 30 °C exactly.
      expect(after.rangeOverrides.temperatureC.watchAbove).toBeCloseTo(30, 6)
      // Bounds left alone are kept exactly as stored, not rounded through the unit shown.
      const profile = (await api('/api/range-profiles', { token: owner })).body.rows.find((p: { id: string }) => p.id === after.profile.id)
      expect(after.rangeOverrides.temperatureC.actAbove).toBe(profile.ranges.temperatureC.actAbove)
      expect(Object.keys(after.rangeOverrides)).toEqual(['temperatureC'])
      await context.close()
    })
  })
}
