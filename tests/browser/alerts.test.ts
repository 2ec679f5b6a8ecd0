import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { launch, shot, signInThroughForm, VIEWPORTS } from '../helpers/browser'

let browser: Browser
beforeAll(async () => {
  browser = await launch()
  // The demo's out-of-range episodes become alerts.
  await api('/api/alerts/scan', { method: 'POST', token: await tokenFor(demo.owner) })
})
afterAll(async () => { await browser?.close() })

describe('alerts in the browser', () => {
  for (const [size, viewport] of Object.entries(VIEWPORTS)) {
    it(`the owner sees open alerts on the home page and works them in the inbox (${size})`, async () => {
      const context = await browser.newContext({ viewport, isMobile: size === 'phone', hasTouch: size === 'phone' })
      const page = await context.newPage()
      page.on('dialog', d => d.accept('Checked on site'))
      await signInThroughForm(page, demo.owner)
      await page.waitForURL(url => url.pathname === '/')
      await page.getByTestId('alert-counts').waitFor()
      expect(await page.getByTestId('alert-counts').textContent()).toMatch(/\d+ to act on today · \d+ to watch/)
      await page.waitForLoadState('networkidle')
      await shot(page, `alerts-home-${size}`)
      await page.goto(`${baseUrl()}/alerts`)
      await page.getByRole('cell', { name: /Watch|Act today/ }).first().waitFor()
      await shot(page, `alerts-inbox-${size}`)
      const before = (await api('/api/alerts?status=acknowledged&pageSize=100', { token: await tokenFor(demo.owner) })).body.total
      await page.getByRole('button', { name: 'Acknowledge' }).first().click()
      await expect.poll(async () => (await api('/api/alerts?status=acknowledged&pageSize=100', { token: await tokenFor(demo.owner) })).body.total).toBe(before + 1)
      await context.close()
    })
  }
})
