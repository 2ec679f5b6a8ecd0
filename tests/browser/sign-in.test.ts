import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { baseUrl, demo } from '../helpers/api'
import { allowPageErrors, launch, shot, signInThroughForm, VIEWPORTS } from '../helpers/browser'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })

const cases = [
  { who: 'owner', email: demo.owner, home: '/', heading: 'Overview' },
  { who: 'technician', email: demo.tess, home: '/today', heading: 'Today' },
  { who: 'customer', email: demo.priya, home: '/portal', heading: 'My water features' },
  { who: 'customer-garden', email: demo.ashgrove, home: '/portal', heading: 'My water features' },
] as const

describe('signing in through the form', () => {
  for (const [size, viewport] of Object.entries(VIEWPORTS)) {
    for (const c of cases) {
      it(`${c.who} lands on their home (${size})`, async () => {
        const context = await browser.newContext({ viewport, isMobile: size === 'phone', hasTouch: size === 'phone' })
        const page = await context.newPage()
        const external: string[] = []
        page.on('request', (req) => {
          if (!req.url().startsWith(baseUrl()) && !req.url().startsWith('data:')) external.push(req.url())
        })
        await signInThroughForm(page, c.email)
        await page.waitForURL(url => url.pathname === c.home)
        await page.getByRole('heading', { level: 1, name: c.heading }).waitFor()
        await page.waitForLoadState('networkidle')
        await shot(page, `${c.who}-home-${size}`)
        if (size === 'phone') {
          await page.getByRole('button', { name: 'Menu' }).click()
          await shot(page, `${c.who}-menu-${size}`)
        }
        expect(external, 'requests leaving the app').toEqual([])
        await context.close()
      })
    }
  }

  it('shows the server\'s message for a wrong password and stays on the sign-in page', async () => {
    const page = await browser.newPage({ viewport: VIEWPORTS.phone })
    allowPageErrors(/status of 401 .*\/api\/auth\/login/)
    await signInThroughForm(page, demo.dario, 'definitely-wrong')
    await page.getByRole('alert').filter({ hasText: 'Wrong e-mail or password' }).waitFor()
    expect(new URL(page.url()).pathname).toBe('/login')
    await shot(page, 'sign-in-wrong-password-phone')
    await page.close()
  })

  it('redirects an anonymous visitor to sign-in and a customer away from owner pages', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.desktop })
    const page = await context.newPage()
    await page.goto(`${baseUrl()}/settings/people`)
    expect(new URL(page.url()).pathname).toBe('/login')
    await signInThroughForm(page, demo.priya)
    await page.waitForURL(url => url.pathname === '/portal')
    await page.goto(`${baseUrl()}/settings/people`)
    await page.waitForURL(url => url.pathname === '/portal')
    await context.close()
  })

  it('the owner sees people in a paged table and signs out', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.desktop })
    const page = await context.newPage()
    await signInThroughForm(page, demo.owner)
    await page.waitForURL(url => url.pathname === '/')
    await page.getByRole('link', { name: 'Settings' }).first().click()
    await page.waitForURL(url => url.pathname === '/settings/people')
    await page.getByRole('cell', { name: 'Tess Okafor', exact: true }).waitFor()
    await shot(page, 'owner-people-desktop')
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(url => url.pathname === '/login')
    await page.goto(`${baseUrl()}/`)
    expect(new URL(page.url()).pathname).toBe('/login')
    await context.close()
  })
})

describe('the error page', () => {
  it('is friendly and offers a way home', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.phone })
    const page = await context.newPage()
    await signInThroughForm(page, demo.tess)
    await page.waitForURL(url => url.pathname === '/today')
    allowPageErrors(/status of 404 \(Page not found: \/no-such-page\)/)
    await page.goto(`${baseUrl()}/no-such-page`)
    await page.getByRole('heading', { name: 'We could not find that page' }).waitFor()
    await shot(page, 'error-404-phone')
    await page.getByRole('button', { name: 'Back to my home' }).click()
    await page.waitForURL(url => url.pathname === '/today')
    await context.close()
  })
})
