import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { baseUrl, demo } from '../helpers/api'
import { launch, signInThroughForm, VIEWPORTS } from '../helpers/browser'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })

describe('the session cookie in the browser', () => {
  it('is HttpOnly and SameSite=Lax after signing in through the form; page script never sees the token', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.desktop })
    const page = await context.newPage()
    const problems: string[] = []
    page.on('console', (m) => { if (m.type() === 'error') problems.push(m.text()) })
    page.on('pageerror', e => problems.push(e.message))
    await signInThroughForm(page, demo.owner)
    await page.waitForURL(url => url.pathname === '/')
    await page.getByRole('heading', { level: 1, name: 'Overview' }).waitFor()

    const session = (await context.cookies()).find(c => c.name === 'auth.token')
    expect(session, 'the session cookie').toBeTruthy()
    expect(session!.httpOnly).toBe(true)
    expect(session!.sameSite).toBe('Lax')
    expect(session!.path).toBe('/')
    expect(session!.value.length).toBeGreaterThan(30)
    const readable = await page.evaluate(() => document.cookie)
    expect(readable).not.toContain(session!.value)
    expect(readable).not.toContain('auth.token=')

    // A full page load renders signed in on the server from the cookie, and the page it sends
    // (its state payload included) does not carry the token either.
    await page.reload()
    await page.getByRole('heading', { level: 1, name: 'Overview' }).waitFor()
    expect(new URL(page.url()).pathname).toBe('/')
    expect(await page.content()).not.toContain(session!.value)
    expect(await page.evaluate(() => document.cookie)).not.toContain(session!.value)

    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(url => url.pathname === '/login')
    expect((await context.cookies()).find(c => c.name === 'auth.token')).toBeUndefined()
    await page.goto(`${baseUrl()}/`)
    expect(new URL(page.url()).pathname).toBe('/login')
    expect(problems).toEqual([])
    await context.close()
  })
})
