import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import sharp from 'sharp'
import type { Browser, Page } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { launch, seriousA11yViolations, shot, signInThroughForm, VIEWPORTS, waitForHydration } from '../helpers/browser'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })

async function accessible(page: Page, name: string) {
  await page.waitForLoadState('networkidle')
  expect(await seriousA11yViolations(page), name).toEqual([])
}

describe('the customer portal on a phone', () => {
  it('reads the latest report, uses the dosing helper, files a request with a photo; the owner books it; the customer sees the visit', async () => {
    const customer = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const cp = await customer.newPage()
    await signInThroughForm(cp, demo.priya)
    await cp.waitForURL(url => url.pathname === '/portal')
    await cp.getByTestId('portal-feature').first().waitFor()
    expect(await cp.getByTestId('advice-headline').first().textContent()).toMatch(/\w+/)
    await shot(cp, 'portal-home-phone')
    await accessible(cp, '/portal')

    // The latest visit report.
    await cp.goto(`${baseUrl()}/portal/visits`)
    await waitForHydration(cp)
    await cp.getByTestId('visit-report-link').first().click()
    await cp.getByRole('heading', { name: 'What we did' }).waitFor()
    await shot(cp, 'portal-report-phone')
    await accessible(cp, '/portal/visits/:id')

    // The dosing helper on the feature's page: pond salt from 0 to 0.1 % (1 g/L), in the US company's units.
    await cp.goto(`${baseUrl()}/portal`)
    await waitForHydration(cp)
    await cp.getByTestId('portal-feature').first().click()
    await cp.getByRole('heading', { name: 'Dosing helper' }).waitFor()
    await cp.getByLabel('Pond salt').check()
    await cp.getByLabel('Salt now (%)').fill('0')
    await cp.getByLabel('Target salt (%)').fill('0.1')
    const result = cp.getByTestId('dose-result')
    await expect.poll(() => result.textContent()).toMatch(/Add \d[\d,.]* lb(?! \()/)
    expect(await result.textContent()).toMatch(/plants and some fish/)
    expect(await result.textContent()).toMatch(/label first/)
    await result.scrollIntoViewIfNeeded()
    await shot(cp, 'portal-dosing-phone')
    await accessible(cp, '/portal/features/:id')

    // A service request with a photo.
    await cp.goto(`${baseUrl()}/portal/requests/new`)
    await waitForHydration(cp)
    await cp.getByLabel('Leak or water loss').check()
    const description = `The pond loses an inch a day since the weekend (${Date.now()})`
    await cp.getByLabel('What is happening?').fill(description)
    const today = (await api('/api/today', { token: await tokenFor(demo.owner) })).body.date as string
    await cp.getByLabel('Preferred day 1').fill(today)
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#2f6f61' } }).jpeg().toBuffer()
    await cp.getByLabel(/Photos \(up to 5\)/).setInputFiles({ name: 'liner.jpg', mimeType: 'image/jpeg', buffer: jpeg })
    await accessible(cp, '/portal/requests/new')
    await shot(cp, 'portal-request-form-phone')
    await cp.getByRole('button', { name: 'Send the request' }).click()
    await cp.waitForURL(url => url.pathname === '/portal/requests')
    const card = cp.getByTestId('request').filter({ hasText: description })
    await card.waitFor()
    expect(await card.getByTestId('request-status').textContent()).toMatch(/Waiting for us/)

    // The owner sees it in the inbox, with the photo, and books it.
    const owner = await browser.newContext({ viewport: VIEWPORTS.desktop })
    const op = await owner.newPage()
    await signInThroughForm(op, demo.owner)
    await op.waitForURL(url => url.pathname === '/')
    await op.goto(`${baseUrl()}/requests`)
    await waitForHydration(op)
    await op.getByTestId('inbox-request').filter({ hasText: description.slice(0, 40) }).click()
    await op.getByRole('img', { name: 'Photo from the customer' }).waitFor()
    await op.getByLabel('Start').fill('15:30')
    await op.getByRole('button', { name: 'Book the visit' }).click()
    await op.getByText(/the customer has been told/).waitFor()
    await shot(op, 'requests-inbox-desktop')
    await owner.close()

    // The customer sees the booked visit on the request and in their upcoming visits.
    await cp.reload()
    await expect.poll(() => card.getByTestId('request-status').textContent()).toMatch(/Visit booked/)
    expect(await card.getByTestId('request-visit').textContent()).toMatch(/Visit booked:/)
    await shot(cp, 'portal-requests-phone')
    await cp.goto(`${baseUrl()}/portal`)
    await waitForHydration(cp)
    await cp.getByTestId('upcoming-visits').waitFor()
    expect(await cp.getByTestId('upcoming-visits').textContent()).toMatch(/Repair/)
    await customer.close()
  })

  it('invoices, preferences and requests pass the accessibility check', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.priya)
    await page.waitForURL(url => url.pathname === '/portal')
    for (const path of ['/portal/invoices', '/portal/preferences', '/portal/requests', '/portal/visits']) {
      await page.goto(`${baseUrl()}${path}`)
      await page.getByRole('heading', { level: 1 }).waitFor()
      await accessible(page, path)
      await shot(page, `portal-${path.split('/').pop()}-phone`)
    }
    // Keyboard: the first link after the top bar can be reached with Tab and has a visible name.
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => document.activeElement?.textContent?.trim().length ?? 0)).toBeGreaterThan(0)
    await context.close()
  })
})
