import { createRequire } from 'node:module'
import { mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import { baseUrl, DEMO_PASSWORD } from './api'

export const ARTIFACTS = resolve(import.meta.dirname, '../artifacts')
mkdirSync(ARTIFACTS, { recursive: true })

export const VIEWPORTS = {
  phone: { width: 390, height: 844 },
  desktop: { width: 1280, height: 800 },
} as const

/**
 * Console errors and uncaught page errors seen since the current test began, from every page of
 * every browser `launch()` gave. `tests/setup/browser-page-errors.ts` fails the test after it ends
 * when any are left; a test that causes one on purpose names it with `allowPageErrors()`.
 */
const pageErrors: string[] = []
let allowed: RegExp[] = []

function watchContext(context: BrowserContext) {
  context.on('console', (m) => {
    if (m.type() !== 'error') return
    const where = m.location()?.url
    pageErrors.push(`console error on ${m.page()?.url() ?? '?'}: ${m.text()}${where ? ` (${where})` : ''}`)
  })
  context.on('weberror', e => pageErrors.push(`uncaught error on ${e.page()?.url() ?? '?'}: ${e.error().stack ?? e.error().message}`))
  return context
}

/** Lets console errors matching one of the patterns pass in the current test (e.g. the 401 of a wrong password). */
export function allowPageErrors(...patterns: RegExp[]) {
  allowed.push(...patterns)
}

/** The errors not allowed since the last call; resets the list and the allowances (one test's worth). */
export function takePageErrors() {
  const left = pageErrors.filter(e => !allowed.some(p => p.test(e)))
  pageErrors.length = 0
  allowed = []
  return left
}

export async function launch(): Promise<Browser> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--no-first-run'],
  })
  const newContext = browser.newContext.bind(browser)
  browser.newContext = async (...args) => watchContext(await newContext(...args))
  browser.newPage = async (...args) => {
    const context = await browser.newContext(...args)
    const page = await context.newPage()
    page.on('close', () => { void context.close() })
    return page
  }
  return browser
}

export async function signInThroughForm(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto(`${baseUrl()}/login`)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
}

export function shot(page: Page, name: string) {
  return page.screenshot({ path: resolve(ARTIFACTS, `${name}.png`), fullPage: true })
}

/** Serious and critical accessibility problems axe-core finds on the page (empty when there are none). */
export async function seriousA11yViolations(page: Page) {
  await page.addScriptTag({ path: createRequire(import.meta.url).resolve('axe-core/axe.min.js') })
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: Array<{ id: string, impact: string | null, help: string, nodes: Array<{ target: unknown[] }> }> }> } }).axe
    const r = await axe.run(document, { resultTypes: ['violations'] })
    return r.violations
  })
  return violations.filter(v => v.impact === 'serious' || v.impact === 'critical')
    .map(v => `${v.impact}: ${v.id} — ${v.help} (${v.nodes.slice(0, 3).map(n => String(n.target[0])).join(', ')})`)
}

/**
 * Until Nuxt has hydrated the page: a click before that reaches a button with no handler yet and
 * is lost (on a loaded machine, a freshly loaded page can take seconds).
 */
export async function waitForHydration(page: Page) {
  await page.waitForFunction(() => {
    const app = (document.querySelector('#__nuxt') as { __vue_app__?: { $nuxt?: { isHydrating?: boolean } } } | null)?.__vue_app__
    return app?.$nuxt?.isHydrating === false
  }, undefined, { timeout: 30_000 })
}

/**
 * A new context at a phone or desktop width (touch on the phone), signed in as `email` through the
 * form, on the schedule board gone to `date`. The caller closes the context.
 */
export async function openSchedule(browser: Browser, size: keyof typeof VIEWPORTS, email: string, date: string) {
  const context = await browser.newContext({ viewport: VIEWPORTS[size], isMobile: size === 'phone', hasTouch: size === 'phone' })
  const page = await context.newPage()
  await signInThroughForm(page, email)
  await page.waitForURL(url => url.pathname === '/')
  await page.goto(`${baseUrl()}/schedule`)
  await waitForHydration(page)
  await page.getByLabel('Go to date').fill(date)
  return { context, page }
}
