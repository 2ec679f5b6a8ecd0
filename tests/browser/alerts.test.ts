import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { launch, shot, signInThroughForm, VIEWPORTS, waitForHydration } from '../helpers/browser'
import { visitForTessToday } from '../helpers/visits'

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
      if (size === 'phone') {
        // Each alert is a card: its actions are on screen without scrolling sideways.
        const acknowledge = page.getByRole('button', { name: 'Acknowledge' }).first()
        await acknowledge.waitFor()
        const box = await acknowledge.boundingBox()
        expect(box!.x + box!.width).toBeLessThanOrEqual(viewport.width)
        expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width)
      }
      // Resolving asks what was done, in place: empty is refused, a note resolves it.
      const resolvedBefore = (await api('/api/alerts?status=resolved&pageSize=100', { token: await tokenFor(demo.owner) })).body.total
      await page.getByRole('button', { name: 'Resolve' }).first().click()
      await page.getByRole('button', { name: 'Save and resolve' }).click()
      await page.getByText('Say what was done').waitFor()
      await shot(page, `alerts-resolve-empty-${size}`)
      await page.getByLabel('What was done?').fill('Partial water change; retested, back in range')
      await page.getByRole('button', { name: 'Save and resolve' }).click()
      await expect.poll(async () => (await api('/api/alerts?status=resolved&pageSize=100', { token: await tokenFor(demo.owner) })).body.total).toBe(resolvedBefore + 1)
      await context.close()
    })
  }
})

describe('a retest visit from an alert', () => {
  it('the owner opens the alert e-mail\'s link and books the retest in one click; the row then links to the visit', async () => {
    const owner = await tokenFor(demo.owner)
    const tess = await tokenFor(demo.tess)
    // A pond of its own whose test is at the act level (koi pond defaults: total ammonia act above 1.0 mg/L as N).
    const v = await visitForTessToday('retest-browser')
    await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
    const reading = { id: randomUUID(), featureId: v.featureId, takenAt: new Date(Date.now() - 3_600_000).toISOString(), ammoniaBasis: 'N', temperatureC: 24, pH: 8.0, totalAmmoniaMgL: 2.0 }
    expect((await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [reading] } })).status).toBe(200)
    await api('/api/alerts/scan', { method: 'POST', token: owner })
    const rows = (await api(`/api/alerts?featureId=${v.featureId}&status=active&severity=act&pageSize=100`, { token: owner })).body.rows as Array<{ id: string, featureId: string | null, retestVisitId: string | null, title: string }>
    const alert = rows.find(r => r.featureId && !r.retestVisitId)
    expect(alert, 'an act-level alert about the test pond').toBeTruthy()
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.owner)
    await page.waitForURL(url => url.pathname === '/')
    await page.goto(`${baseUrl()}/alerts?retest=${alert!.id}`)
    await waitForHydration(page)
    await page.getByText('Book a water retest at this feature on the next working day?').waitFor()
    await shot(page, 'alerts-retest-offer-phone')
    await page.getByRole('button', { name: 'Book a retest visit' }).first().click()
    await page.getByRole('status').filter({ hasText: 'Retest booked for' }).waitFor()
    const after = (await api(`/api/alerts?featureId=${alert!.featureId}&status=active&pageSize=100`, { token: owner })).body.rows as Array<{ id: string, retestVisitId: string | null }>
    const visitId = after.find(r => r.id === alert!.id)?.retestVisitId
    expect(visitId).toBeTruthy()
    expect(await page.getByRole('link', { name: 'Open the visit' }).getAttribute('href')).toBe(`/visits/${visitId}`)
    await shot(page, 'alerts-retest-booked-phone')
    await context.close()
  })
})
