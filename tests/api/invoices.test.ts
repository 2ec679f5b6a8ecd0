import { randomUUID } from 'node:crypto'
import { eq } from 'drizzle-orm'
import Stripe from 'stripe'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import * as schema from '../../server/db/schema'
import { PAYMENT_STATES, providerStatus } from '../../server/utils/payment-states'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { closeTestDb, testDb } from '../helpers/billing-book'
import { waitForMail } from '../helpers/mail'

let owner: string
let tess: string
let priya: string
let ashgrove: string
let priyaCustomerId: string
let ashgroveCustomerId: string
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  tess = await tokenFor(demo.tess)
  priya = await tokenFor(demo.priya)
  ashgrove = await tokenFor(demo.ashgrove)
  priyaCustomerId = (await api('/api/auth/session', { token: priya })).body.customerId
  ashgroveCustomerId = (await api('/api/auth/session', { token: ashgrove })).body.customerId
})
afterAll(closeTestDb)

const lines = [
  { kind: 'part', description: 'Pump impeller, fitted', quantity: 1, unitPriceMinor: 333, taxable: true },
  { kind: 'treatment', description: 'Beneficial bacteria, 2 doses', quantity: 1, unitPriceMinor: 333, taxable: true },
  { kind: 'extra_visit', description: 'Extra clean-out visit', quantity: 1, unitPriceMinor: 334, taxable: true },
  { kind: 'labour', description: 'Labour', quantity: 1.5, unitPriceMinor: 6_000, taxable: false },
]
async function draft(customerId = priyaCustomerId) {
  const r = await api('/api/invoices', { method: 'POST', token: owner, body: { customerId, lines, notes: 'Thank you' } })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body
}
const act = (id: string, body: Record<string, unknown>, token = owner) => api(`/api/invoices/${id}/actions`, { method: 'POST', token, body })
const invoiceCount = async () => (await testDb().select({ id: schema.invoices.id }).from(schema.invoices)).length

describe('invoices by hand', () => {
  it('computes a draft from its lines: tax per line, rounded once (7.25 % on $10.00 taxable = $0.73)', async () => {
    const d = await draft()
    expect(d).toMatchObject({ status: 'preparing', number: null, subtotalMinor: 10_000, taxRateBasisPoints: 725, taxMinor: 73, totalMinor: 10_073, currency: 'USD' })
    expect(d.lines.map((l: { amountMinor: number }) => l.amountMinor)).toEqual([333, 333, 334, 9_000])
  })

  it('refuses bad input with a 400 naming the field, and writes nothing', async () => {
    const before = await invoiceCount()
    const cases: Array<[unknown, RegExp]> = [
      [{ customerId: priyaCustomerId, lines: [] }, /lines/],
      [{ customerId: priyaCustomerId, lines: [{ ...lines[0], unitPriceMinor: 12.5 }] }, /lines\.0\.unitPriceMinor/],
      [{ customerId: priyaCustomerId, lines: [{ ...lines[0], quantity: 0 }] }, /lines\.0\.quantity/],
      [{ customerId: priyaCustomerId, lines: [{ ...lines[0], quantity: 1.234 }] }, /lines\.0\.quantity/],
      [{ customerId: priyaCustomerId, lines: [{ ...lines[0], unitPriceMinor: -100 }] }, /lines\.0\.unitPriceMinor/],
      [{ customerId: 'nope', lines }, /customerId/],
      [{ customerId: randomUUID(), lines }, /customerId/],
    ]
    for (const [body, field] of cases) {
      const r = await api('/api/invoices', { method: 'POST', token: owner, body })
      expect(r.status, JSON.stringify(r.body)).toBe(400)
      expect(r.body.message).toMatch(field)
    }
    expect(await invoiceCount()).toBe(before)
  })

  it('numbers invoices in sequence without gaps as they are issued; a cancelled one keeps its number', async () => {
    const a = await draft()
    const b = await draft()
    const fa = await act(a.id, { action: 'issue' })
    expect(fa.status, JSON.stringify(fa.body)).toBe(200)
    const fb = await act(b.id, { action: 'issue' })
    const [ya, na] = fa.body.number.split('-').map(Number)
    const [yb, nb] = fb.body.number.split('-').map(Number)
    expect(yb).toBe(ya)
    expect(nb).toBe(na + 1)
    expect(fa.body).toMatchObject({ status: 'due', issueDate: fa.body.today })
    // Due after the company's payment terms (30 days in the demo).
    expect(Date.parse(fa.body.dueDate) - Date.parse(fa.body.issueDate)).toBe(30 * 86_400_000)
    expect((await act(a.id, { action: 'issue' })).status).toBe(409)
    expect((await api(`/api/invoices/${a.id}`, { method: 'PATCH', token: owner, body: { notes: 'changed' } })).status).toBe(409)
    const v = await act(a.id, { action: 'cancel', reason: 'Raised twice' })
    expect(v.body).toMatchObject({ status: 'cancelled', number: fa.body.number })
    expect((await act(a.id, { action: 'cancel', reason: 'again' })).status).toBe(409)
    expect((await act(b.id, { action: 'cancel' })).status).toBe(400)
  })

  it('edits a draft\'s lines and recomputes the totals', async () => {
    const d = await draft()
    const r = await api(`/api/invoices/${d.id}`, { method: 'PATCH', token: owner, body: { lines: [{ kind: 'part', description: 'Skimmer net', quantity: 2, unitPriceMinor: 1_250, taxable: true }] } })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    // $25.00 × 7.25 % = 1.8125 → $1.81.
    expect(r.body).toMatchObject({ subtotalMinor: 2_500, taxMinor: 181, totalMinor: 2_681 })
  })

  it('sends the invoice to the customer\'s invoice contacts, and records a cheque with a receipt', async () => {
    const d = await draft()
    const open = (await act(d.id, { action: 'issue' })).body
    const sent = await act(d.id, { action: 'send' })
    expect(sent.status, JSON.stringify(sent.body)).toBe(200)
    await api('/api/outbox/flush', { method: 'POST', token: owner })
    const mail = await waitForMail(m => m.subject.startsWith(`Invoice ${open.number} from Heronmere Water Gardens`))
    expect(mail.to).toContain(demo.priya)
    expect(mail.text).toContain('$100.73')
    expect(mail.text).toContain(`/portal/invoices/${d.id}`)
    const paid = await act(d.id, { action: 'record_payment', method: 'cheque', reference: 'Cheque 2231', paidOn: open.issueDate })
    expect(paid.body).toMatchObject({ status: 'paid', amountPaidMinor: 10_073, paymentMethod: 'cheque', paymentReference: 'Cheque 2231' })
    expect((await act(d.id, { action: 'record_payment', method: 'cheque', paidOn: open.issueDate })).status).toBe(409)
    await api('/api/outbox/flush', { method: 'POST', token: owner })
    const receipt = await waitForMail(m => m.subject === `Payment received for invoice ${open.number}, thank you`)
    expect(receipt.text).toMatch(/Cheque, ref\. Cheque 2231/)
  })

  it('lists, filters, sorts and pages on the server, and exports the same rows as CSV', async () => {
    const page = await api('/api/invoices?status=paid&sort=total&dir=desc&pageSize=5', { token: owner })
    expect(page.status).toBe(200)
    expect(page.body.rows).toHaveLength(5)
    expect(page.body.total).toBeGreaterThan(5)
    const totals = page.body.rows.map((r: { totalMinor: number }) => r.totalMinor)
    expect(totals).toEqual([...totals].sort((a, b) => b - a))
    expect(page.body.rows.every((r: { status: string }) => r.status === 'paid')).toBe(true)
    const overdue = await api('/api/invoices?status=overdue&pageSize=100', { token: owner })
    expect(overdue.body.rows.every((r: { overdue: boolean }) => r.overdue)).toBe(true)
    expect((await api('/api/invoices?sort=bogus', { token: owner })).status).toBe(400)
    expect((await api('/api/invoices?pageSize=1000', { token: owner })).status).toBe(400)

    const csv = await fetch(`${baseUrl()}/api/exports/invoices.csv?status=paid&sort=total&dir=desc`, { headers: { authorization: `Bearer ${owner}` } })
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    const rows = (await csv.text()).trim().split('\r\n')
    expect(rows[0]).toBe('number,status,customer,issue_date,due_date,period_start,period_end,currency,subtotal,tax,total,paid,due,paid_at,payment_method')
    expect(rows.length - 1).toBe(page.body.total)
    expect(rows[1]!.split(',')[0]).toBe(page.body.rows[0].number)
  })

  it('renders a PDF for the owner and the invoice\'s customer', async () => {
    const d = await draft()
    const open = (await act(d.id, { action: 'issue' })).body
    for (const token of [owner, priya]) {
      const r = await fetch(`${baseUrl()}/api/invoices/${d.id}/pdf`, { headers: { authorization: `Bearer ${token}` } })
      expect(r.status).toBe(200)
      expect(r.headers.get('content-type')).toBe('application/pdf')
      expect(r.headers.get('content-disposition')).toContain(`invoice-${open.number}.pdf`)
      const bytes = Buffer.from(await r.arrayBuffer())
      expect(bytes.subarray(0, 5).toString()).toBe('%PDF-')
    }
  })
})

describe('invoice tenancy', () => {
  it('customers see only their own invoices, never ones being prepared; technicians see none', async () => {
    const mine = await draft()
    const theirs = await draft(ashgroveCustomerId)
    await act(theirs.id, { action: 'issue' })
    // A draft is the owner's: its customer gets 404 too.
    expect((await api(`/api/invoices/${mine.id}`, { token: priya })).status).toBe(404)
    await act(mine.id, { action: 'issue' })
    expect((await api(`/api/invoices/${mine.id}`, { token: priya })).status).toBe(200)
    for (const path of [`/api/invoices/${theirs.id}`, `/api/invoices/${theirs.id}/pdf`]) {
      expect((await api(path, { token: priya })).status).toBe(404)
    }
    expect((await api(`/api/invoices/${theirs.id}/pay`, { method: 'POST', token: priya })).status).toBe(404)
    const list = await api('/api/invoices?pageSize=100', { token: priya })
    expect(list.body.rows.length).toBeGreaterThan(0)
    expect(list.body.rows.every((r: { customerId: string, status: string }) => r.customerId === priyaCustomerId && r.status !== 'preparing')).toBe(true)
    // Filtering for someone else's invoices finds nothing rather than theirs.
    expect((await api(`/api/invoices?customerId=${ashgroveCustomerId}`, { token: priya })).body.total).toBe(0)
    // A customer sees no internal fields.
    expect((await api(`/api/invoices/${mine.id}`, { token: priya })).body.staff).toBeNull()
    expect((await api('/api/invoices', { token: tess })).status).toBe(403)
    expect((await api(`/api/invoices/${mine.id}/actions`, { method: 'POST', token: priya, body: { action: 'cancel', reason: 'x' } })).status).toBe(403)
  })
})

describe('paying online and the payment webhook', () => {
  const secret = () => inject('paymentsEnv').STRIPE_WEBHOOK_SECRET!
  function signed(payload: string, key = secret()) {
    return Stripe.webhooks.generateTestHeaderString({ payload, secret: key })
  }
  const post = (payload: string, signature?: string) => fetch(`${baseUrl()}/api/webhooks/payments`, {
    method: 'POST', headers: { 'content-type': 'application/json', ...(signature ? { 'stripe-signature': signature } : {}) }, body: payload,
  })
  async function openInvoice() {
    const d = await draft()
    return (await act(d.id, { action: 'issue' })).body as { id: string, number: string, totalMinor: number, currency: string }
  }
  const row = async (id: string) => (await testDb().select().from(schema.invoices).where(eq(schema.invoices.id, id)))[0]!
  const eventFor = (type: string, inv: { id: string }, extra: Record<string, unknown> = {}) => JSON.stringify({
    id: `evt_test_${randomUUID().replace(/-/g, '')}`, object: 'event', type, created: Math.floor(Date.now() / 1000), livemode: false,
    data: { object: { object: 'invoice', id: `in_unknown_${randomUUID().slice(0, 8)}`, metadata: { rillbook_invoice_id: inv.id }, status_transitions: { paid_at: Math.floor(Date.now() / 1000) }, ...extra } },
  })

  it('each provider event that closes an invoice lands on the matching state of ours; a failed payment leaves it due', async () => {
    const closing = Object.entries(PAYMENT_STATES).filter(([, p]) => p.event)
    expect(closing.map(([ours]) => ours).sort()).toEqual(['cancelled', 'paid', 'written_off'])
    for (const [ours, p] of closing) {
      const inv = await openInvoice()
      const payload = eventFor(p.event!, inv, { amount_paid: inv.totalMinor, currency: inv.currency.toLowerCase() })
      const r = await post(payload, signed(payload))
      expect(r.status).toBe(200)
      expect(await r.json()).toMatchObject({ outcome: 'applied', invoiceId: inv.id })
      const after = await row(inv.id)
      expect(after.status).toBe(ours)
      if (ours === 'cancelled') expect(after.cancelledAt).not.toBeNull()
      if (ours === 'written_off') expect(after.writtenOffAt).not.toBeNull()
    }
    const inv = await openInvoice()
    const failed = eventFor('invoice.payment_failed', inv, { last_payment_error: { message: 'Card declined' } })
    expect((await post(failed, signed(failed))).status).toBe(200)
    expect(await row(inv.id)).toMatchObject({ status: 'due', lastPaymentError: 'Card declined' })
  })

  it('a bad or missing signature gets 400 and changes nothing', async () => {
    const inv = await openInvoice()
    const payload = eventFor('invoice.paid', inv)
    const eventId = JSON.parse(payload).id as string
    expect((await post(payload, signed(payload, 'whsec_wrong'))).status).toBe(400)
    expect((await post(payload)).status).toBe(400)
    // Signed, then altered: still refused.
    expect((await post(payload.replace('invoice.paid', 'invoice.voided'), signed(payload))).status).toBe(400)
    expect((await row(inv.id)).status).toBe('due')
    // Nothing recorded for this event (other events, e.g. the provider's own for this invoice, may arrive meanwhile).
    expect(await testDb().select({ id: schema.paymentEvents.id }).from(schema.paymentEvents).where(eq(schema.paymentEvents.id, eventId))).toHaveLength(0)
  })

  it('applies an event once: a repeat is acknowledged and changes nothing; a late failure cannot undo a payment', async () => {
    const inv = await openInvoice()
    const payload = eventFor('invoice.paid', inv, { amount_paid: inv.totalMinor, currency: inv.currency.toLowerCase() })
    const first = await post(payload, signed(payload))
    expect(first.status).toBe(200)
    expect(await first.json()).toMatchObject({ received: true, outcome: 'applied', invoiceId: inv.id })
    const paid = await row(inv.id)
    expect(paid).toMatchObject({ status: 'paid', paymentMethod: 'card', amountPaidMinor: paid.totalMinor })
    const again = await post(payload, signed(payload))
    expect(await again.json()).toMatchObject({ received: true, outcome: 'duplicate' })
    expect((await row(inv.id)).updatedAt).toEqual(paid.updatedAt)
    const receipts = await testDb().select().from(schema.outbox).where(eq(schema.outbox.dedupeKey, `invoice:${inv.id}:receipt`))
    expect(receipts).toHaveLength(1)
    const late = eventFor('invoice.payment_failed', inv, { last_payment_error: { message: 'Your card was declined.' } })
    expect(await (await post(late, signed(late))).json()).toMatchObject({ outcome: 'ignored: invoice is paid' })
    expect((await row(inv.id)).status).toBe('paid')
  })

  it('an invoice.paid for another amount or currency does not mark it paid: it is recorded and shown to the owner', async () => {
    const receipts = async (id: string) => (await testDb().select().from(schema.outbox).where(eq(schema.outbox.dedupeKey, `invoice:${id}:receipt`))).length
    const send = async (inv: { id: string }, extra: Record<string, unknown>) => {
      const payload = eventFor('invoice.paid', inv, extra)
      const r = await post(payload, signed(payload))
      expect(r.status).toBe(200)
      return { body: await r.json(), eventId: JSON.parse(payload).id as string }
    }
    // Short by $10.00: the $10.00 less is counted as paid, the rest stays due.
    const short = await openInvoice()
    const sent = await send(short, { amount_paid: short.totalMinor - 1000, currency: 'usd' })
    expect(sent.body).toMatchObject({ received: true, invoiceId: short.id })
    expect(sent.body.outcome).toMatch(/^recorded: /)
    expect(await row(short.id)).toMatchObject({ status: 'due', paidAt: null, amountPaidMinor: short.totalMinor - 1000 })
    expect((await row(short.id)).paymentMismatch).toMatchObject({ eventId: sent.eventId, paidMinor: short.totalMinor - 1000, paidCurrency: 'USD', dueMinor: short.totalMinor, countedMinor: short.totalMinor - 1000 })
    expect(await receipts(short.id)).toBe(0)
    const page = await api(`/api/invoices/${short.id}`, { token: owner })
    expect(page.body).toMatchObject({ status: 'due', amountDueMinor: 1000, staff: { paymentMismatch: { paidMinor: short.totalMinor - 1000, dueMinor: short.totalMinor } } })
    // More than is due, the right amount in another currency, or no amount at all: nothing counted.
    const over = await openInvoice()
    await send(over, { amount_paid: over.totalMinor + 500, currency: 'usd' })
    const euros = await openInvoice()
    await send(euros, { amount_paid: euros.totalMinor, currency: 'eur' })
    const silent = await openInvoice()
    await send(silent, {})
    for (const [inv, paidMinor, paidCurrency] of [[over, over.totalMinor + 500, 'USD'], [euros, euros.totalMinor, 'EUR'], [silent, null, 'USD']] as const) {
      expect(await row(inv.id)).toMatchObject({ status: 'due', amountPaidMinor: 0, paidAt: null })
      expect((await row(inv.id)).paymentMismatch).toMatchObject({ paidMinor, paidCurrency, dueMinor: inv.totalMinor, countedMinor: 0 })
      expect(await receipts(inv.id)).toBe(0)
    }
    // The owner's home lists each one with what happened; a customer never sees it.
    const home = await api('/api/overview', { token: owner })
    const listed = home.body.paymentsToCheck as Array<{ id: string, number: string, mismatch: { paidMinor: number | null } }>
    for (const inv of [short, over, euros, silent]) expect(listed.find(p => p.id === inv.id), inv.number).toBeTruthy()
    expect((await api(`/api/invoices/${short.id}`, { token: priya })).body.staff).toBeNull()
    // Once the owner records the rest, it is paid and leaves the list.
    expect((await act(short.id, { action: 'record_payment', method: 'bank_transfer', reference: 'rest', paidOn: page.body.issueDate })).body.status).toBe('paid')
    expect(((await api('/api/overview', { token: owner })).body.paymentsToCheck as Array<{ id: string }>).some(p => p.id === short.id)).toBe(false)
  })

  it('the customer pays through the provider\'s page: a declined card leaves it due, a good card pays it', async () => {
    const inv = await openInvoice()
    const pay = await api(`/api/invoices/${inv.id}/pay`, { method: 'POST', token: priya })
    expect(pay.status, JSON.stringify(pay.body)).toBe(200)
    expect(pay.body.url).toMatch(new RegExp(`^${inject('paymentsUrl')}/pay/in_`))
    const declined = await fetch(pay.body.url, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'card=4000000000000002' })
    expect(await declined.text()).toContain('Your card was declined.')
    await expect.poll(async () => (await row(inv.id)).lastPaymentError, { timeout: 10_000 }).toBe('Your card was declined.')
    expect((await row(inv.id)).status).toBe('due')
    const ok = await fetch(pay.body.url, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'card=4242 4242 4242 4242' })
    const page = await ok.text()
    expect(page).toContain('Payment received')
    expect(page).toContain(`/portal/invoices/${inv.id}?paid=1`)
    await expect.poll(async () => (await row(inv.id)).status, { timeout: 10_000 }).toBe('paid')
    // The fake delivering the same event again (as providers do) changes nothing.
    const events = await (await fetch(`${inject('paymentsUrl')}/__fake/events?type=invoice.paid`)).json() as { data: Array<{ id: string, data: { object: { metadata: Record<string, string> } } }> }
    const ev = events.data.find(e => e.data.object.metadata.rillbook_invoice_id === inv.id)!
    await fetch(`${inject('paymentsUrl')}/__fake/events/${ev.id}/redeliver`, { method: 'POST' })
    await expect.poll(async () => (await fetch(`${inject('paymentsUrl')}/__fake/events?type=invoice.paid`).then(r => r.json()) as { data: Array<{ id: string, attempts: number, delivered: boolean }> }).data.find(e => e.id === ev.id)!.attempts, { timeout: 10_000 }).toBeGreaterThanOrEqual(2)
    const stored = await testDb().select().from(schema.paymentEvents).where(eq(schema.paymentEvents.id, ev.id))
    expect(stored).toHaveLength(1)
    expect((await testDb().select().from(schema.outbox).where(eq(schema.outbox.dedupeKey, `invoice:${inv.id}:receipt`)))).toHaveLength(1)
    expect((await api(`/api/invoices/${inv.id}/pay`, { method: 'POST', token: priya })).status).toBe(409)
  })

  it('cancelling an invoice the provider holds closes it there too; with the provider down nothing changes (503)', async () => {
    const inv = await openInvoice()
    await api(`/api/invoices/${inv.id}/pay`, { method: 'POST', token: priya })
    const ref = (await row(inv.id)).providerInvoiceId!
    await fetch(`${inject('paymentsUrl')}/__fake/outage`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ down: true }) })
    let r
    try {
      r = await act(inv.id, { action: 'cancel', reason: 'Customer moved' })
    }
    finally {
      await fetch(`${inject('paymentsUrl')}/__fake/outage`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ down: false }) })
    }
    expect(r.status).toBe(503)
    expect((await row(inv.id)).status).toBe('due')
    expect((await act(inv.id, { action: 'cancel', reason: 'Customer moved' })).body.status).toBe('cancelled')
    const stripe = new Stripe(inject('paymentsEnv').STRIPE_SECRET_KEY!, { host: '127.0.0.1', port: Number(new URL(inject('paymentsUrl')).port), protocol: 'http', maxNetworkRetries: 0, telemetry: false })
    expect((await stripe.invoices.retrieve(ref)).status).toBe(providerStatus('cancelled'))
  })
})
