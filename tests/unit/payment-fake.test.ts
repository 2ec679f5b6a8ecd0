import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Stripe from 'stripe'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
// @ts-expect-error plain ESM script without types
import { API_VERSION, installWebhookSecret, parseForm, startPaymentFake } from '../../scripts/payment-fake.mjs'

// The local payment-provider fake, driven through the provider's real Node SDK, with a tiny
// webhook receiver standing in for the app.
const SECRET = 'whsec_rillbook_fake_test_secret'
const KEY = 'sk_test_rillbook_fake'

interface Delivery { body: string, signature: string, event: Stripe.Event }
const deliveries: Delivery[] = []
let failNextDeliveries = 0
let receiver: Server
let hookUrl = ''
let dir = ''
let fake: { port: number, url: string, close(): Promise<void> }
let stripe: Stripe

function client(key = KEY, port = fake.port) {
  return new Stripe(key, { host: '127.0.0.1', port, protocol: 'http', maxNetworkRetries: 0, telemetry: false })
}

async function waitFor<T>(what: string, probe: () => T | undefined | false, ms = 3000): Promise<T> {
  const end = Date.now() + ms
  for (;;) {
    const value = probe()
    if (value) return value
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`)
    await new Promise(r => setTimeout(r, 20))
  }
}
const deliveriesOf = (type: string, invoiceId: string) =>
  deliveries.filter(d => d.event.type === type && (d.event.data.object as { id?: string }).id === invoiceId)

async function control(path: string, body?: unknown) {
  const res = await fetch(`${fake.url}/__fake/${path}`, body === undefined
    ? {}
    : { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  return { status: res.status, json: await res.json() as any }
}
async function payPage(invoiceId: string, card?: string) {
  const res = await fetch(`${fake.url}/pay/${invoiceId}`, card === undefined
    ? {}
    : { method: 'POST', headers: { 'Content-Type': 'application/x-www-form-urlencoded' }, body: new URLSearchParams({ card }) })
  return { status: res.status, html: await res.text() }
}

/** A finalized invoice of 120.00 minus a 15.00 discount, ready to pay. */
async function openInvoice(metadata: Record<string, string> = {}) {
  const customer = await stripe.customers.create({ name: 'Dana Reed', email: 'dana@example.test', metadata: { customer_id: 'c-1' } })
  const draft = await stripe.invoices.create({
    customer: customer.id, collection_method: 'send_invoice', days_until_due: 30, currency: 'usd',
    description: 'Spring opening', metadata: { invoice_id: 'inv-1', ...metadata }, auto_advance: false,
  })
  await stripe.invoiceItems.create({ customer: customer.id, invoice: draft.id, amount: 12000, currency: 'usd', description: 'Spring opening visit' })
  await stripe.invoiceItems.create({ customer: customer.id, invoice: draft.id, amount: -1500, currency: 'usd', description: 'Loyalty discount' })
  const invoice = await stripe.invoices.finalizeInvoice(draft.id)
  return { customer, draft, invoice }
}

beforeAll(async () => {
  receiver = createServer((req, res) => {
    let body = ''
    req.setEncoding('utf8')
    req.on('data', (c: string) => { body += c })
    req.on('end', () => {
      if (failNextDeliveries > 0) {
        failNextDeliveries--
        res.writeHead(500).end('try again')
        return
      }
      deliveries.push({ body, signature: String(req.headers['stripe-signature']), event: JSON.parse(body) })
      res.writeHead(200, { 'Content-Type': 'application/json' }).end('{"received":true}')
    })
  })
  await new Promise<void>(r => receiver.listen(0, '127.0.0.1', () => r()))
  hookUrl = `http://127.0.0.1:${(receiver.address() as AddressInfo).port}/api/webhooks/payments`
  dir = mkdtempSync(join(tmpdir(), 'rillbook-payments-'))
  fake = await startPaymentFake({ port: 0, dir, webhookUrl: hookUrl, webhookSecret: SECRET, retryBaseMs: 50 })
  stripe = client()
})

afterAll(async () => {
  await fake?.close()
  await new Promise(r => receiver?.close(r))
  if (dir) rmSync(dir, { recursive: true, force: true })
})

describe('payment-provider fake', () => {
  it('parses the SDK form encoding into nested objects', () => {
    expect(parseForm('metadata[invoice_id]=inv-1&lines[0][amount]=5&lines[1][amount]=6&expand[]=customer&expand[]=lines&a=x%20y'))
      .toEqual({ metadata: { invoice_id: 'inv-1' }, lines: [{ amount: '5' }, { amount: '6' }], expand: ['customer', 'lines'], a: 'x y' })
    expect(parseForm('__proto__[polluted]=1')).toEqual({})
  })

  it('builds a draft from a customer and two invoice items, then finalizes it with totals and a hosted URL', async () => {
    const { customer, draft, invoice } = await openInvoice()
    expect(customer).toMatchObject({
      object: 'customer', name: 'Dana Reed', email: 'dana@example.test', metadata: { customer_id: 'c-1' }, livemode: false,
    })
    expect(customer.id).toMatch(/^cus_[A-Za-z0-9]{14,24}$/)
    expect(draft).toMatchObject({ object: 'invoice', status: 'draft', number: null, hosted_invoice_url: null, amount_due: 0, customer: customer.id })
    expect(invoice).toMatchObject({
      status: 'open', currency: 'usd', subtotal: 10500, total: 10500, amount_due: 10500, amount_paid: 0, amount_remaining: 10500,
      hosted_invoice_url: `${fake.url}/pay/${draft.id}`, metadata: { invoice_id: 'inv-1' },
    })
    expect(invoice.number).toMatch(/^FAKE-\d{4}$/)
    expect(invoice.status_transitions.finalized_at).toBeGreaterThan(0)
    expect(invoice.due_date).toBe(invoice.status_transitions.finalized_at! + 30 * 86400)
    expect(invoice.lines.data.map(l => [l.description, l.amount])).toEqual([['Spring opening visit', 12000], ['Loyalty discount', -1500]])

    const again = await stripe.invoices.retrieve(draft.id)
    expect(again.total).toBe(10500)
    const listed = await stripe.invoices.list({ customer: customer.id, limit: 5 })
    expect(listed.data.map(i => i.id)).toEqual([draft.id])

    const finalized = await waitFor('invoice.finalized', () => deliveriesOf('invoice.finalized', draft.id)[0])
    expect(finalized.event).toMatchObject({ object: 'event', api_version: Stripe.API_VERSION, livemode: false, data: { object: { status: 'open' } } })
    expect(API_VERSION).toBe(Stripe.API_VERSION)
  })

  it('replays a repeated Idempotency-Key without doing the work twice, and refuses it for other parameters', async () => {
    const customer = await stripe.customers.create({ name: 'Idem' })
    const draft = await stripe.invoices.create({ customer: customer.id, collection_method: 'send_invoice', days_until_due: 14 })
    const params = { customer: customer.id, invoice: draft.id, amount: 2500, currency: 'usd', description: 'Filter media' }
    const first = await stripe.invoiceItems.create(params, { idempotencyKey: 'item-key-1' })
    const second = await stripe.invoiceItems.create(params, { idempotencyKey: 'item-key-1' })
    expect(second).toEqual(first)
    expect(second.lastResponse.headers['idempotent-replayed']).toBe('true')
    expect((await stripe.invoices.retrieve(draft.id)).lines.data).toHaveLength(1)

    const err = await stripe.invoiceItems.create({ ...params, amount: 9999 }, { idempotencyKey: 'item-key-1' }).catch(e => e)
    expect(err).toBeInstanceOf(Stripe.errors.StripeIdempotencyError)
    expect(err.message).toMatch(/same parameters they were first used with/)
    const otherPath = await stripe.customers.create({ name: 'x' }, { idempotencyKey: 'item-key-1' }).catch(e => e)
    expect(otherPath).toBeInstanceOf(Stripe.errors.StripeIdempotencyError)
  })

  it('answers a bad key, a wrong state, an unknown id and an unknown parameter with the typed SDK errors', async () => {
    const auth = await client('sk_live_not_accepted').customers.create({ name: 'x' }).catch(e => e)
    expect(auth).toBeInstanceOf(Stripe.errors.StripeAuthenticationError)
    expect(auth.statusCode).toBe(401)

    const { invoice } = await openInvoice()
    const refinalize = await stripe.invoices.finalizeInvoice(invoice.id).catch(e => e)
    expect(refinalize).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(refinalize.message).toMatch(/is open; you can only finalize an invoice that is draft/)

    const customer = await stripe.customers.create({ name: 'Void draft' })
    const draft = await stripe.invoices.create({ customer: customer.id, collection_method: 'send_invoice', days_until_due: 7 })
    const voidDraft = await stripe.invoices.voidInvoice(draft.id).catch(e => e)
    expect(voidDraft).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(await stripe.invoices.del(draft.id)).toMatchObject({ id: draft.id, deleted: true })
    expect(await stripe.invoices.del(invoice.id).catch(e => e)).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    const itemOnOpen = await stripe.invoiceItems
      .create({ customer: invoice.customer as string, invoice: invoice.id, amount: 100, currency: 'usd' })
      .catch(e => e)
    expect(itemOnOpen).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)

    const missing = await stripe.invoices.retrieve('in_doesnotexist000000').catch(e => e)
    expect(missing).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(missing).toMatchObject({ statusCode: 404, code: 'resource_missing' })
    const unknown = await stripe.customers.create({ name: 'x', nmae: 'typo' } as Stripe.CustomerCreateParams).catch(e => e)
    expect(unknown.message).toBe('Received unknown parameter: nmae')
    const noRoute = await stripe.rawRequest('GET', '/v1/nothing_here', {}).catch(e => e)
    expect(noRoute).toMatchObject({ statusCode: 404, message: expect.stringMatching(/^Unrecognized request URL/) })
  })

  it('takes the good test card on the hosted page, marks the invoice paid and sends a signed invoice.paid', async () => {
    const { invoice } = await openInvoice({ return_url: 'http://127.0.0.1:3000/i/abc' })
    const form = await payPage(invoice.id)
    expect(form.html).toContain(`<title>Pay invoice ${invoice.number}</title>`)
    expect(form.html).toContain('<label for="card">Card number</label>')
    expect(form.html).toContain('name="card"')
    expect(form.html).toContain('Pay $105.00')
    expect(form.html).toContain('4242 4242 4242 4242')

    const paid = await payPage(invoice.id, '4242 4242 4242 4242')
    expect(paid.status).toBe(200)
    expect(paid.html).toContain('Payment received')
    expect(paid.html).toContain('href="http://127.0.0.1:3000/i/abc"')
    expect(paid.html).toContain('Back to the invoice')
    expect(paid.html).toContain('<meta http-equiv="refresh" content="2;url=http://127.0.0.1:3000/i/abc">')
    const after = await stripe.invoices.retrieve(invoice.id)
    expect(after).toMatchObject({ status: 'paid', amount_paid: 10500, amount_remaining: 0 })
    expect(after.status_transitions.paid_at).toBeGreaterThan(0)
    expect((await payPage(invoice.id)).html).toContain('This invoice is paid')

    const delivery = await waitFor('invoice.paid', () => deliveriesOf('invoice.paid', invoice.id)[0])
    const event = stripe.webhooks.constructEvent(delivery.body, delivery.signature, SECRET)
    expect(event.type).toBe('invoice.paid')
    expect(event.data.object).toMatchObject({ id: invoice.id, status: 'paid', amount_paid: 10500 })
    expect(() => stripe.webhooks.constructEvent(delivery.body, delivery.signature, 'whsec_wrong'))
      .toThrow(Stripe.errors.StripeSignatureVerificationError)
    const types = deliveries.filter(d => (d.event.data.object as { id?: string }).id === invoice.id).map(d => d.event.type)
    expect(types.indexOf('invoice.payment_succeeded')).toBeGreaterThan(-1)
    expect(types.indexOf('invoice.payment_succeeded')).toBeLessThan(types.indexOf('invoice.paid'))
  })

  it('declines the declined test card with invoice.payment_failed and leaves the invoice open', async () => {
    const { invoice } = await openInvoice()
    const declined = await payPage(invoice.id, '4000000000000002')
    expect(declined.html).toContain('Your card was declined.')
    expect(declined.html).toContain('name="card"')
    expect((await stripe.invoices.retrieve(invoice.id)).status).toBe('open')
    const failed = await waitFor('invoice.payment_failed', () => deliveriesOf('invoice.payment_failed', invoice.id)[0])
    expect(failed.event.data.object).toMatchObject({
      status: 'open', last_payment_error: { code: 'card_declined', message: 'Your card was declined.' },
    })

    const other = await payPage(invoice.id, '1234')
    expect(other.html).toContain('Use one of the test cards.')
  })

  it('pays out of band, voids and marks uncollectible through the API, with their events', async () => {
    const a = (await openInvoice()).invoice
    const paid = await stripe.invoices.pay(a.id, { paid_out_of_band: true })
    expect(paid).toMatchObject({ status: 'paid', amount_paid: 10500, amount_remaining: 0 })
    expect((paid as unknown as { paid_out_of_band: boolean }).paid_out_of_band).toBe(true)
    const noCard = await stripe.invoices.pay((await openInvoice()).invoice.id).catch(e => e)
    expect(noCard).toBeInstanceOf(Stripe.errors.StripeCardError)

    const b = (await openInvoice()).invoice
    await stripe.invoices.sendInvoice(b.id)
    const voided = await stripe.invoices.voidInvoice(b.id)
    expect(voided.status).toBe('void')
    expect(voided.status_transitions.voided_at).toBeGreaterThan(0)
    expect(await stripe.invoices.markUncollectible(b.id).catch(e => e)).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)

    const c = (await openInvoice()).invoice
    const written = await stripe.invoices.markUncollectible(c.id)
    expect(written.status).toBe('uncollectible')
    expect(written.status_transitions.marked_uncollectible_at).toBeGreaterThan(0)

    await waitFor('the events', () => deliveriesOf('invoice.paid', a.id).length && deliveriesOf('invoice.sent', b.id).length
      && deliveriesOf('invoice.voided', b.id).length && deliveriesOf('invoice.marked_uncollectible', c.id).length)
  })

  it('retries a failed delivery, lists events with their delivery state, and redelivers an event on request', async () => {
    failNextDeliveries = 1
    const { invoice } = await openInvoice()
    const delivered = await waitFor('the retried invoice.finalized', () => deliveriesOf('invoice.finalized', invoice.id)[0])
    const { json } = await control(`events?invoice=${invoice.id}&type=invoice.finalized`)
    expect(json.data).toHaveLength(1)
    expect(json.data[0]).toMatchObject({ id: delivered.event.id, delivered: true, attempts: 2, last_status: 200 })

    const redo = await control(`events/${delivered.event.id}/redeliver`, {})
    expect(redo.status).toBe(202)
    const twice = await waitFor('the redelivery', () => {
      const all = deliveriesOf('invoice.finalized', invoice.id)
      return all.length === 2 && all
    })
    expect(twice[1]!.event.id).toBe(delivered.event.id)
    expect(twice[1]!.body).toBe(delivered.body)
    expect(stripe.webhooks.constructEvent(twice[1]!.body, twice[1]!.signature, SECRET).id).toBe(delivered.event.id)
    expect((await control('health')).json).toEqual({ ok: true })
  })

  it('drops every API call during an outage (StripeConnectionError) while the hosted page keeps working', async () => {
    const customer = await stripe.customers.create({ name: 'Outage' })
    expect((await control('outage', { down: true })).json).toEqual({ down: true })
    try {
      const err = await stripe.customers.retrieve(customer.id).catch(e => e)
      expect(err).toBeInstanceOf(Stripe.errors.StripeConnectionError)
      expect((await payPage('in_unknown')).status).toBe(404)
    }
    finally {
      await control('outage', { down: false })
    }
    expect((await stripe.customers.retrieve(customer.id)).id).toBe(customer.id)
  })

  it('keeps its state across a restart with the same directory', async () => {
    const { customer, invoice } = await openInvoice()
    await fake.close()
    fake = await startPaymentFake({ port: 0, dir, webhookUrl: hookUrl, webhookSecret: SECRET, retryBaseMs: 50 })
    stripe = client()
    const again = await stripe.invoices.retrieve(invoice.id)
    expect(again).toMatchObject({
      id: invoice.id, number: invoice.number, status: 'open', total: 10500, hosted_invoice_url: `${fake.url}/pay/${invoice.id}`,
    })
    expect((await stripe.customers.retrieve(customer.id)).id).toBe(customer.id)
    const next = await openInvoice()
    expect(Number(next.invoice.number!.slice(5))).toBe(Number(invoice.number!.slice(5)) + 1)
  })
})

describe('the install\'s webhook secret', () => {
  it('is made at random on the first start, kept in the data folder (0600) and reused, never a constant', () => {
    const a = mkdtempSync(join(tmpdir(), 'rillbook-secret-'))
    const b = mkdtempSync(join(tmpdir(), 'rillbook-secret-'))
    try {
      const first = installWebhookSecret(join(a, 'payments'))
      expect(first).toMatch(/^whsec_[\w-]{40,}$/)
      expect(readFileSync(join(a, 'payments', 'webhook-secret'), 'utf8').trim()).toBe(first)
      expect(statSync(join(a, 'payments', 'webhook-secret')).mode & 0o777).toBe(0o600)
      // The next start of the same install signs with the same secret; another install has its own.
      expect(installWebhookSecret(join(a, 'payments'))).toBe(first)
      expect(installWebhookSecret(join(b, 'payments'))).not.toBe(first)
      // An emptied or damaged file is replaced by a fresh random secret.
      writeFileSync(join(a, 'payments', 'webhook-secret'), 'whsec_short\n')
      const fresh = installWebhookSecret(join(a, 'payments'))
      expect(fresh).not.toBe(first)
      expect(fresh).toMatch(/^whsec_[\w-]{40,}$/)
    }
    finally {
      rmSync(a, { recursive: true, force: true })
      rmSync(b, { recursive: true, force: true })
    }
  })

  it('has no default written in the start script, the server or the configuration', () => {
    const root = join(import.meta.dirname, '../..')
    for (const file of ['scripts/start.mjs', 'scripts/payment-fake.mjs', 'server/utils/payments.ts', 'server/api/webhooks/payments.post.ts', 'nuxt.config.ts']) {
      expect(readFileSync(join(root, file), 'utf8'), file).not.toMatch(/whsec_\w{4,}/)
    }
  })
})
