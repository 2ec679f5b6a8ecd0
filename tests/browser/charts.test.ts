import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { launch, shot, signInThroughForm, VIEWPORTS } from '../helpers/browser'

let browser: Browser
let koiId: string
beforeAll(async () => {
  browser = await launch()
  const owner = await tokenFor(demo.owner)
  const r = await api('/api/features?q=Whitcombe', { token: owner })
  koiId = r.body.rows.find((f: { kind: string, name: string }) => f.kind === 'koi_pond').id
})
afterAll(async () => { await browser?.close() })

/** A page that records console errors and uncaught exceptions. */
async function pageFor(size: keyof typeof VIEWPORTS): Promise<{ context: BrowserContext, page: Page, errors: string[] }> {
  const context = await browser.newContext({ viewport: VIEWPORTS[size], isMobile: size === 'phone', hasTouch: size === 'phone' })
  const page = await context.newPage()
  const errors: string[] = []
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()) })
  page.on('pageerror', e => errors.push(String(e)))
  return { context, page, errors }
}

/** Waits until every chart on the page has drawn its canvas. */
async function chartsDrawn(page: Page) {
  const trends = page.getByTestId('water-trends')
  await trends.locator('figure canvas').first().waitFor()
  await page.waitForFunction(() => {
    const figures = [...document.querySelectorAll('[data-testid="water-trends"] figure')]
    return figures.length > 0 && figures.every(f => f.querySelector('canvas'))
  })
  return trends
}

const chartIds = (page: Page) => page.locator('[data-testid="water-trends"] figure').evaluateAll(els => els.map(e => e.getAttribute('data-chart')))

describe('water trend charts', () => {
  for (const size of ['phone', 'desktop'] as const) {
    it(`the owner sees the koi pond's charts, reads the values as text and switches the range (${size})`, async () => {
      const { context, page, errors } = await pageFor(size)
      await signInThroughForm(page, demo.owner)
      await page.waitForURL(url => url.pathname !== '/login')
      errors.length = 0
      await page.goto(`${baseUrl()}/features/${koiId}`)
      await page.getByRole('heading', { level: 1, name: 'Koi pond' }).waitFor()
      await page.getByRole('heading', { name: 'Water over time' }).waitFor()
      const trends = await chartsDrawn(page)

      const ids = await chartIds(page)
      expect(ids).toEqual(expect.arrayContaining(['temperature', 'ph', 'ammonia', 'hardness', 'oxygen']))
      // Each chart says what it shows, its latest value and status.
      const ph = trends.locator('figure[data-chart="ph"] [role="img"]')
      expect(await ph.getAttribute('aria-label')).toMatch(/^pH: latest \d+(\.\d)? on \w{3} \d+, \d{4}, (in range|watch|act now)\./)
      expect(await trends.locator('figure[data-chart="temperature"] [role="img"]').getAttribute('aria-label')).toMatch(/°F/)
      // The text alternative: a table of the latest values.
      const details = trends.locator('figure[data-chart="ammonia"] details')
      await details.locator('summary').click()
      const rows = details.locator('tbody tr')
      expect(await rows.count()).toBeGreaterThan(0)
      expect(await rows.count()).toBeLessThanOrEqual(20)
      expect(await details.locator('thead').textContent()).toMatch(/Total ammonia \(TAN\) \(mg\/L\).*Un-ionized ammonia \(mg\/L\)/)
      expect(await rows.first().textContent()).toMatch(/\d\.\d+/)
      await shot(page, `charts-owner-${size}`)

      // The range picker refetches: all time starts before the last 12 months.
      const year = page.getByRole('button', { name: '12 months' })
      expect(await year.getAttribute('aria-pressed')).toBe('true')
      const labelBefore = await ph.getAttribute('aria-label')
      const seriesCall = page.waitForResponse(r => r.url().includes(`/api/features/${koiId}/series`) && r.url().includes('range=all'))
      await page.getByRole('button', { name: 'All time' }).click()
      expect((await seriesCall).status()).toBe(200)
      await page.waitForFunction(([sel, before]) => document.querySelector(sel!)?.getAttribute('aria-label') !== before, [`[data-chart="ph"] [role="img"]`, labelBefore] as const)
      expect(await page.getByRole('button', { name: 'All time' }).getAttribute('aria-pressed')).toBe('true')
      const shownFrom = (label: string | null) => Date.parse(label!.match(/shown from (\w{3} \d+, \d{4})/)![1]!)
      expect(shownFrom(await ph.getAttribute('aria-label'))).toBeLessThan(shownFrom(labelBefore))
      await chartsDrawn(page)
      await page.getByRole('button', { name: 'This season' }).click()
      await page.waitForFunction(() => document.querySelector('button[aria-pressed="true"]')?.textContent?.includes('This season'))
      await chartsDrawn(page)
      await page.waitForTimeout(1000) // the axes fade from the old range to the new one
      await shot(page, `charts-owner-season-${size}`)
      expect(errors, errors.join('\n')).toEqual([])
      await context.close()
    })
  }

  for (const size of ['phone', 'desktop'] as const) {
    it(`the customer sees simplified charts on her own feature page (${size})`, async () => {
      const { context, page, errors } = await pageFor(size)
      await signInThroughForm(page, demo.priya)
      await page.waitForURL(url => url.pathname === '/portal')
      await page.getByRole('link', { name: /Koi pond/ }).first().click()
      await page.getByRole('heading', { level: 1, name: 'Koi pond' }).waitFor()
      await chartsDrawn(page)
      expect(await chartIds(page)).toEqual(['temperature', 'ph', 'ammonia', 'hardness'])
      expect(await page.getByRole('button', { name: 'This season' }).isVisible()).toBe(true)
      const kh = page.locator('figure[data-chart="hardness"] [role="img"]')
      expect(await kh.getAttribute('aria-label')).toMatch(/^Hardness \(KH and GH\): latest (KH )?\d+ mg\/L.* on /)
      await shot(page, `charts-customer-${size}`)
      expect(errors, errors.join('\n')).toEqual([])
      await context.close()
    })
  }
})
