import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { allowPageErrors, launch, shot, signInThroughForm, VIEWPORTS, waitForHydration } from '../helpers/browser'
import { waitForMail } from '../helpers/mail'

let browser: Browser
beforeAll(async () => { browser = await launch() })
afterAll(async () => { await browser?.close() })

const receivables = async () => (await api('/api/revenue', { token: await tokenFor(demo.owner) })).body.receivablesTotalMinor as number

describe('billing in the browser', () => {
  it('the owner writes, issues and sends an invoice; the customer gets the e-mail, pays on the provider\'s page; the owner sees it paid', async () => {
    const owner = await browser.newContext({ viewport: VIEWPORTS.desktop })
    const op = await owner.newPage()
    await signInThroughForm(op, demo.owner)
    await op.waitForURL(url => url.pathname === '/')
    await op.goto(`${baseUrl()}/invoices`)
    await op.getByRole('cell').first().waitFor()
    await shot(op, 'billing-invoices-desktop')

    await op.goto(`${baseUrl()}/invoices/new`)

    await waitForHydration(op)
    await op.getByLabel('Find the customer').fill('Whitcombe')
    await op.getByLabel('Customer', { exact: true }).locator('option', { hasText: 'Priya Whitcombe' }).waitFor({ state: 'attached' })
    await op.getByLabel('Customer', { exact: true }).selectOption({ label: 'Priya Whitcombe' })
    await op.getByLabel('Description').fill('Replacement UV lamp, fitted')
    await op.getByLabel('Unit price').fill('86.50')
    // $86.50 + 7.25 % = 86.50 + 6.27125 → $92.77, shown before saving.
    await expect.poll(() => op.getByTestId('draft-totals').textContent()).toContain('$92.77')
    await op.getByRole('button', { name: 'Save for later' }).click()
    await op.waitForURL(url => /^\/invoices\/[0-9a-f-]{36}$/.test(url.pathname))
    const invoiceId = op.url().split('/').pop()!
    await op.getByRole('button', { name: 'Issue' }).click()
    await expect.poll(() => op.getByTestId('invoice-status').first().textContent()).toMatch(/^\s*due\s*$/i)
    const number = (await op.getByRole('heading', { level: 1 }).textContent())!.replace('Invoice ', '').trim()
    expect(number).toMatch(/^\d{4}-\d{4}$/)
    const before = await receivables()
    await op.getByRole('button', { name: 'Send to the customer' }).click()
    await expect.poll(() => op.getByTestId('invoice-note').textContent()).toContain('Sent to the customer.')
    await shot(op, 'billing-invoice-due-desktop')

    // The e-mail reaches the customer (the outbox is flushed by the owner's button or the minute task).
    await api('/api/outbox/flush', { method: 'POST', token: await tokenFor(demo.owner) })
    const mail = await waitForMail(m => m.to.includes(demo.priya) && m.subject.startsWith(`Invoice ${number} `))
    expect(mail.text).toContain('$92.77')
    const link = mail.text.match(/https?:\/\/\S+\/portal\/invoices\/[0-9a-f-]{36}/)![0]
    expect(link).toContain(invoiceId)

    // The customer, on a phone, follows the link and pays on the provider's page.
    const customer = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const cp = await customer.newPage()
    await signInThroughForm(cp, demo.priya)
    await cp.waitForURL(url => url.pathname.startsWith('/portal'))
    // The local payment fake's page has no icon; the browser's request for one is not the product's.
    allowPageErrors(/status of 404 .*\/favicon\.ico\)$/)
    await cp.goto(new URL(new URL(link).pathname, baseUrl()).toString())
    await cp.getByRole('button', { name: /Pay \$92\.77 by card/ }).waitFor()
    await shot(cp, 'billing-portal-invoice-phone')
    await cp.getByRole('button', { name: /Pay \$92\.77 by card/ }).click()
    await cp.getByLabel('Card number').waitFor()
    await shot(cp, 'billing-payment-page-phone')
    await cp.getByLabel('Card number').fill('4242 4242 4242 4242')
    await cp.getByRole('button', { name: /^Pay/ }).click()
    await cp.getByText('Payment received').waitFor()
    await cp.getByRole('link', { name: 'Back to the invoice' }).click()
    await cp.waitForURL(url => url.pathname === `/portal/invoices/${invoiceId}`)
    await cp.getByTestId('paid-note').waitFor({ timeout: 20_000 })
    expect(await cp.getByTestId('paid-note').textContent()).toMatch(/Paid/)
    await shot(cp, 'billing-portal-paid-phone')

    // The owner sees it paid, the receipt goes out, and the revenue view no longer counts it as owed.
    await op.reload()
    await expect.poll(() => op.getByTestId('invoice-status').first().textContent()).toMatch(/paid/i)
    await api('/api/outbox/flush', { method: 'POST', token: await tokenFor(demo.owner) })
    await waitForMail(m => m.to.includes(demo.priya) && m.subject === `Payment received for invoice ${number}, thank you`)
    expect(await receivables()).toBe(before - 9_277)
    await op.goto(`${baseUrl()}/revenue`)
    await op.getByTestId('mrr').waitFor()
    expect(await op.getByTestId('receivables-total').textContent()).toContain(formatUsd(before - 9_277))
    await op.waitForLoadState('networkidle')
    await shot(op, 'billing-revenue-desktop')
    await owner.close()
    await customer.close()
  })

  it('the revenue view, the invoices list and an invoice read well on a phone', async () => {
    const context = await browser.newContext({ viewport: VIEWPORTS.phone, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInThroughForm(page, demo.owner)
    await page.waitForURL(url => url.pathname === '/')
    await page.goto(`${baseUrl()}/revenue`)
    await page.getByRole('heading', { name: 'Definitions' }).waitFor()
    await page.waitForLoadState('networkidle')
    // Nothing wider than the screen.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(VIEWPORTS.phone.width + 1)
    await shot(page, 'billing-revenue-phone')
    await page.goto(`${baseUrl()}/invoices`)
    await page.getByRole('cell').first().waitFor()
    await shot(page, 'billing-invoices-phone')
    await page.getByRole('cell').getByRole('link').first().click()
    await page.getByTestId('invoice-status').first().waitFor()
    await page.waitForLoadState('networkidle')
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(VIEWPORTS.phone.width + 1)
    await shot(page, 'billing-invoice-phone')
    await context.close()
  })
})

function formatUsd(minor: number) {
  return new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD' }).format(minor / 100)
}
