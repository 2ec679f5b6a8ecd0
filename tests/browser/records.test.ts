import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { baseUrl, demo } from '../helpers/api'
import { launch, shot, signInThroughForm, VIEWPORTS } from '../helpers/browser'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })

async function open(page: Page, path: string) {
  await page.goto(`${baseUrl()}${path}`)
  await page.waitForLoadState('networkidle')
}

describe('records in the browser', () => {
  for (const [size, viewport] of Object.entries(VIEWPORTS)) {
    it(`a staff member creates, edits, searches and archives a customer, site and feature (${size})`, async () => {
      const context = await browser.newContext({ viewport, isMobile: size === 'phone', hasTouch: size === 'phone' })
      const page = await context.newPage()
      page.on('dialog', d => d.accept())
      const who = size === 'phone' ? demo.dario : demo.owner
      const name = `Juniper Testpond ${size}`
      await signInThroughForm(page, who)
      await page.waitForURL(url => url.pathname !== '/login')

      // Customer: a bad save shows field errors in place, then a good one lands on the customer page.
      await open(page, '/customers/new')
      await page.getByRole('button', { name: 'Save customer' }).click()
      await page.getByText('Enter the customer\'s name').waitFor()
      await shot(page, `records-customer-errors-${size}`)
      await page.getByLabel('Name', { exact: true }).first().fill(name)
      await page.locator('#ct-0-name').fill(name)
      await page.locator('#ct-0-email').fill(`juniper-${size}@testpond.example`)
      await page.getByLabel('Tags').fill('koi, trial')
      await page.getByLabel('Street', { exact: true }).fill('9 Lily Mead')
      await page.getByLabel('Town or city').fill('Larchfield')
      await page.getByRole('button', { name: 'Save customer' }).click()
      await page.getByRole('heading', { level: 1, name }).waitFor()

      // Site.
      await page.getByRole('link', { name: 'Add site' }).click()
      await page.getByLabel('Street address').fill('9 Lily Mead')
      await page.getByLabel('Town or city').fill('Larchfield')
      await page.getByLabel('Gate or lock code').fill('2468#')
      await page.getByLabel('Dogs').check()
      await page.getByRole('button', { name: 'Save site' }).click()
      await page.getByRole('heading', { level: 1, name }).waitFor()
      await page.getByText('2468#').waitFor()

      // Feature: the volume preview follows the sizes typed (US units: feet → US gallons).
      await page.getByRole('link', { name: 'Add feature' }).click()
      await page.getByLabel('Name', { exact: true }).fill('Front koi pond')
      await page.getByLabel('Length (ft)').fill('10')
      await page.getByLabel('Width (ft)').fill('6')
      await page.getByLabel('Depth (ft)').fill('2')
      await page.getByTestId('volume-preview').filter({ hasText: '898 US gal' }).waitFor()
      await page.getByRole('button', { name: 'Add pump' }).click()
      await page.locator('#p-0-name').fill('Filter pump')
      await page.locator('#p-0-flow').fill('900')
      await shot(page, `records-feature-form-${size}`)
      await page.getByRole('button', { name: 'Save feature' }).click()
      await page.getByRole('heading', { level: 1, name: 'Front koi pond' }).waitFor()
      expect(await page.getByTestId('feature-volume').textContent()).toContain('898 US gal')
      await shot(page, `records-feature-${size}`)

      // Edit: a deeper pond holds more.
      await page.getByRole('link', { name: 'Edit' }).click()
      await page.getByLabel('Depth (ft)').fill('3')
      await page.getByRole('button', { name: 'Save feature' }).click()
      await page.getByTestId('feature-volume').filter({ hasText: '1,346 US gal' }).waitFor()

      // Search finds the new customer by tag text.
      await open(page, '/customers')
      await page.getByLabel('Search customers').fill('trial')
      await page.getByRole('link', { name }).waitFor()
      await shot(page, `records-customers-search-${size}`)
      await page.getByRole('link', { name }).click()

      // Archive: a customer with a site is archived, not deleted.
      await page.getByRole('button', { name: 'Archive' }).click()
      await page.getByText('Archived: the customer keeps their history').waitFor()
      await open(page, '/customers')
      await page.getByLabel('Search customers').fill(name)
      await page.getByText('Nothing to show.').waitFor()
      await page.getByLabel('Show').selectOption('archived')
      await page.getByRole('link', { name }).waitFor()
      await context.close()
    })
  }

  it('a technician checks a water test on a phone and sees statuses and dosing', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.tess)
    await page.waitForURL(url => url.pathname === '/today')
    await open(page, '/features')
    await page.getByLabel('Search water features').fill('Whitcombe')
    await page.getByRole('link', { name: 'Koi pond' }).first().click()
    await page.getByRole('heading', { level: 1, name: 'Koi pond' }).waitFor()
    await page.getByLabel('Water temperature (°F)').fill('75')
    await page.getByRole('textbox', { name: 'pH', exact: true }).fill('8.4')
    await page.getByLabel('Total ammonia (TAN) (mg/L as N)').fill('1.5')
    await page.getByLabel('KH (mg/L as CaCO3)').fill('40')
    await page.getByRole('button', { name: 'Check' }).click()
    await page.getByText('Act today').first().waitFor()
    await page.getByText(/sodium bicarbonate/i).first().waitFor()
    await shot(page, 'records-water-check-phone')
    await context.close()
  })

  it('a customer sees their own features and their detail, without staff controls or gate codes', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.ashgrove)
    await page.waitForURL(url => url.pathname === '/portal')
    await page.getByRole('link', { name: /Meadow stream/ }).waitFor()
    await page.getByRole('link', { name: /Wetland filter bed/ }).waitFor()
    await shot(page, 'records-portal-phone')
    await page.getByRole('link', { name: /Meadow stream/ }).click()
    await page.getByRole('heading', { level: 1, name: 'Meadow stream' }).waitFor()
    expect(await page.getByRole('link', { name: 'Edit' }).count()).toBe(0)
    expect(await page.content()).not.toMatch(/Gate or lock code/)
    await shot(page, 'records-portal-feature-phone')
    await context.close()
  })
})

describe('water ranges', () => {
  it('the owner edits a profile\'s range and a single feature\'s override', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.desktop })
    const page = await context.newPage()
    await signInThroughForm(page, demo.owner)
    await page.waitForURL(url => url.pathname === '/')
    await open(page, '/settings/ranges')
    await page.getByRole('tab', { name: 'Water garden' }).click()
    const input = page.getByLabel('Nitrate (mg/L as NO3): Watch above')
    const before = await input.inputValue()
    await input.fill('25')
    await page.getByRole('button', { name: 'Save ranges' }).click()
    await page.getByText('Saved. Readings from now on').waitFor()
    await shot(page, 'ranges-settings-desktop')
    await page.reload()
    await page.getByRole('tab', { name: 'Water garden' }).click()
    expect(await page.getByLabel('Nitrate (mg/L as NO3): Watch above').inputValue()).toBe('25')
    await page.getByLabel('Nitrate (mg/L as NO3): Watch above').fill(before)
    await page.getByRole('button', { name: 'Save ranges' }).click()
    await page.getByText('Saved. Readings from now on').waitFor()

    await open(page, '/features')
    await page.getByLabel('Search water features').fill('Whitcombe')
    await page.getByRole('link', { name: 'Koi pond' }).first().click()
    await page.getByRole('button', { name: 'Override ranges' }).click()
    await page.getByLabel('pH: Watch below').fill('7.3')
    await page.getByRole('button', { name: 'Save overrides' }).click()
    await page.getByText('Saved for this feature.').waitFor()
    await page.getByRole('button', { name: 'Close' }).click()
    await page.getByRole('button', { name: /Edit 1 override/ }).click()
    expect(await page.getByLabel('pH: Watch below').inputValue()).toBe('7.3')
    await page.getByRole('button', { name: 'Use the profile again' }).click()
    await page.getByText('This feature uses its profile again.').waitFor()
    await context.close()
  })
})
