#!/usr/bin/env node
// A local stand-in for the card-payment provider, for `npm start` and the tests. It answers the
// part of the provider's REST API (/v1) that Rillbook uses, so the provider's official Node SDK can
// be pointed at it with { host: '127.0.0.1', port, protocol: 'http', maxNetworkRetries: 0 }:
// customers, draft invoices with invoice items, finalize / send / pay / void / mark_uncollectible,
// Idempotency-Key replays, and signed webhook events. It mimics the provider, so it speaks the
// provider's own invoice states and events (draft, open, void, uncollectible…): it is on the
// payments adapter's side, like server/utils/payment-states.ts, which maps them to ours. It also
// serves the hosted payment page that an invoice's hosted_invoice_url points at (GET/POST /pay/<invoice id>) and a few test controls
// under /__fake/ (events, redelivery, outage, reset, health). Nothing leaves the machine except
// webhook POSTs to the configured URL.
//   node scripts/payment-fake.mjs --port 12111 --dir .data/payments \
//     --webhook-url http://127.0.0.1:3000/api/webhooks/payments [--webhook-secret <secret>] [--verbose]
// Defaults come from RILLBOOK_PAYMENTS_PORT (12111), RILLBOOK_PAYMENTS_DIR (.data/payments),
// RILLBOOK_PAYMENTS_WEBHOOK_URL, STRIPE_WEBHOOK_SECRET and RILLBOOK_PAYMENTS_PUBLIC_URL. State is
// kept in <dir>/state.json, so provider ids stay valid across restarts. Without a webhook secret
// it signs with this install's own one, <dir>/webhook-secret (random, made on the first start;
// see installWebhookSecret). As a command it writes its pid to <dir>/fake.pid and stops on
// SIGTERM/SIGINT.
import { createHash, createHmac, randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import http from 'node:http'
import https from 'node:https'
import { join, resolve } from 'node:path'
import { argValue, isMain, runUntilStopped, writeAtomic } from './lib/local-service.mjs'

/** The API version pinned by the installed SDK (its apiVersion.js); every event carries it. */
export const API_VERSION = '2026-10-28.endive'
export const TEST_CARDS = { good: '4242424242424242', declined: '4000000000000002' }
const MAX_ATTEMPTS = 8
const IDEMPOTENCY_TTL_S = 24 * 3600
const ALNUM = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789'
const LOOPBACK = new Set(['127.0.0.1', '::1', '::ffff:127.0.0.1'])

/**
 * This install's webhook signing secret for the local fake: read from `<dir>/webhook-secret`, or
 * made at random (32 bytes) on the first start and written there (mode 0600, never replaced by a
 * second start racing the first). The app and the fake both get it from `scripts/start.mjs`, so
 * no two installs share one and none is written in the source.
 * @param {string} dir the fake's state folder (inside the git-ignored `.data/`)
 * @returns {string}
 */
export function installWebhookSecret(dir) {
  const file = join(dir, 'webhook-secret')
  const usable = /^whsec_[\w-]{32,}$/
  const read = () => (existsSync(file) ? readFileSync(file, 'utf8').trim() : '')
  const found = read()
  if (usable.test(found)) return found
  mkdirSync(dir, { recursive: true })
  const made = `whsec_${randomBytes(32).toString('base64url')}`
  try {
    // A missing or unreadable file: write a new one, exclusively unless it is there but unusable.
    writeFileSync(file, `${made}\n`, { mode: 0o600, flag: found || existsSync(file) ? 'w' : 'wx' })
  }
  catch (err) {
    if (err?.code !== 'EEXIST') throw err
    const theirs = read()
    if (usable.test(theirs)) return theirs
    throw err
  }
  return made
}

const now = () => Math.floor(Date.now() / 1000)

/** Provider-style id: prefix, underscore, 24 random letters and digits. */
function newId(prefix) {
  let s = ''
  for (const b of randomBytes(24)) s += ALNUM[b % ALNUM.length]
  return `${prefix}_${s}`
}

function freshState() {
  return { customers: {}, invoices: {}, invoiceItems: {}, events: [], idempotency: {}, counters: { invoiceNumber: 0 } }
}

/** An error answered as { error: { type, message, ... } }; the SDK picks its error class by status and type. */
class ApiError extends Error {
  constructor(status, type, message, extra = {}) {
    super(message)
    this.status = status
    this.body = { error: { type, message, ...extra } }
  }
}
const invalid = (message, extra) => new ApiError(400, 'invalid_request_error', message, extra)
const noSuch = (kind, id, param = 'id') =>
  new ApiError(404, 'invalid_request_error', `No such ${kind}: '${id}'`, { code: 'resource_missing', param })

/**
 * Parses the SDK's form encoding into nested objects: `metadata[a]=1` → { metadata: { a: '1' } },
 * `lines[0][x]=1` and `expand[]=y` → arrays. Every leaf stays a string.
 */
export function parseForm(text) {
  const out = {}
  for (const [rawKey, value] of new URLSearchParams(text)) {
    const m = /^([^[\]]+)((?:\[[^\]]*\])*)$/.exec(rawKey)
    const keys = m ? [m[1], ...[...m[2].matchAll(/\[([^\]]*)\]/g)].map(x => x[1])] : [rawKey]
    if (keys.some(k => k === '__proto__' || k === 'constructor' || k === 'prototype')) continue
    let node = out
    keys.forEach((k, i) => {
      const key = k === '' && Array.isArray(node) ? node.length : k
      if (i === keys.length - 1) node[key] = value
      else {
        if (typeof node[key] !== 'object' || node[key] === null) node[key] = keys[i + 1] === '' || /^\d+$/.test(keys[i + 1]) ? [] : {}
        node = node[key]
      }
    })
  }
  return out
}

// Parameter readers: the provider rejects parameters it does not know, and so does the fake.
function only(p, allowed) {
  for (const k of Object.keys(p)) {
    if (k !== 'expand' && !allowed.includes(k)) throw invalid(`Received unknown parameter: ${k}`, { param: k })
  }
}
function str(p, name) {
  const v = p[name]
  if (v === undefined) return undefined
  if (typeof v !== 'string') throw invalid(`Invalid string: ${name} must be a string`, { param: name })
  return v
}
function int(p, name, min = -Infinity) {
  const v = str(p, name)
  if (v === undefined || v === '') return undefined
  if (!/^-?\d+$/.test(v) || Number(v) < min) throw invalid(`Invalid integer: ${v}`, { param: name })
  return Number(v)
}
function bool(p, name) {
  const v = str(p, name)
  if (v === undefined) return undefined
  if (v !== 'true' && v !== 'false') throw invalid(`Invalid boolean: ${v}`, { param: name })
  return v === 'true'
}
function currency(p, fallback) {
  const v = str(p, 'currency')?.toLowerCase() ?? fallback
  if (!/^[a-z]{3}$/.test(v ?? '')) throw invalid(`Invalid currency: ${v}`, { param: 'currency' })
  return v
}
/** The provider's metadata rules: keys merge, '' deletes a key, metadata='' clears everything. */
function mergeMetadata(current, incoming) {
  if (incoming === undefined) return current
  if (incoming === '') return {}
  if (typeof incoming !== 'object' || Array.isArray(incoming)) throw invalid('Invalid object', { param: 'metadata' })
  const out = { ...current }
  for (const [k, v] of Object.entries(incoming)) {
    if (typeof v !== 'string' || k.length > 40 || v.length > 500) {
      throw invalid(`Invalid metadata[${k}]: keys are at most 40 characters, values at most 500.`, { param: `metadata[${k}]` })
    }
    if (v === '') delete out[k]
    else out[k] = v
  }
  if (Object.keys(out).length > 50) throw invalid('Metadata can have at most 50 keys.', { param: 'metadata' })
  return out
}

/** Amount in minor units as the currency is written ("$1,450.00", "¥1,200"). */
function formatAmount(minor, cur) {
  try {
    const f = new Intl.NumberFormat('en', { style: 'currency', currency: cur.toUpperCase() })
    return f.format(minor / 10 ** (f.resolvedOptions().maximumFractionDigits ?? 2))
  }
  catch { return `${minor} ${cur.toUpperCase()}` }
}
const esc = s => String(s).replace(/[&<>"']/g, c => `&#${c.charCodeAt(0)};`)

const CSS = `body{margin:0;padding:2rem 1rem;font:16px/1.5 system-ui,sans-serif;background:#f4f5f4;color:#1b1f1d}
main{max-width:26rem;margin:0 auto;padding:1.5rem;background:#fff;border:1px solid #c9cfcc;border-radius:.5rem}
h1{font-size:1.3rem;margin:0 0 1rem}.amount{font-size:2rem;font-weight:600;margin:0 0 .5rem}
label{display:block;font-weight:600;margin-top:1rem}
input{box-sizing:border-box;width:100%;font:inherit;padding:.6rem;margin-top:.25rem;border:1px solid #6b7470;border-radius:.375rem}
button,.button{display:inline-block;margin-top:1rem;padding:.6rem 1.2rem;font:inherit;font-weight:600;border:0;
border-radius:.375rem;background:#245a48;color:#fff;text-decoration:none;cursor:pointer}
:focus-visible{outline:3px solid #1558b0;outline-offset:2px}
.error{padding:.5rem .75rem;border-left:4px solid #a3001b;background:#fdecef;color:#7a0014;font-weight:600}
.note{font-size:.9rem;color:#4d5551}`

/** One self-contained HTML page (inline CSS, no scripts, no external assets). */
function page(title, heading, body, refreshUrl) {
  const refresh = refreshUrl ? `<meta http-equiv="refresh" content="2;url=${esc(refreshUrl)}">` : ''
  return `<!doctype html><html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">${refresh}<title>${esc(title)}</title>
<style>${CSS}</style></head><body><main><h1>${esc(heading)}</h1>${body}
<p class="note">This is a local test payment page. No real money moves.</p></main></body></html>`
}
function returnUrl(inv) {
  const url = inv.metadata?.return_url
  return typeof url === 'string' && /^https?:\/\//i.test(url) ? url : null
}
function payForm(inv, error) {
  const amount = formatAmount(inv.amount_remaining, inv.currency)
  const due = inv.due_date ? `<p>Due ${new Date(inv.due_date * 1000).toISOString().slice(0, 10)}</p>` : ''
  const desc = inv.description ? `<p>${esc(inv.description)}</p>` : ''
  const err = error ? `<p id="card-error" class="error" role="alert">${esc(error)}</p>` : ''
  const described = error ? 'card-error card-help' : 'card-help'
  return page(`Pay invoice ${inv.number}`, `Pay invoice ${inv.number}`, `<p>Amount due</p>
<p class="amount">${esc(amount)}</p>${due}${desc}${err}<form method="post" action="/pay/${esc(inv.id)}">
<label for="card">Card number</label><input id="card" name="card" inputmode="numeric" autocomplete="cc-number" required
 aria-describedby="${described}"${error ? ' aria-invalid="true"' : ''}>
<p id="card-help" class="note">Test cards: 4242 4242 4242 4242 is accepted; 4000 0000 0000 0002 is declined.</p>
<button type="submit">Pay ${esc(amount)}</button></form>`)
}
function paidPage(inv, heading, justPaid) {
  const back = returnUrl(inv)
  const link = back ? `<p><a class="button" href="${esc(back)}">Back to the invoice</a></p>` : ''
  const amount = formatAmount(inv.amount_paid, inv.currency)
  return page(`${heading}: invoice ${inv.number}`, heading,
    `<p>Invoice ${esc(inv.number)}, ${esc(amount)} paid.</p>${link}`, justPaid ? back : null)
}
function notPayablePage(inv) {
  const why = inv.status === 'draft' ? 'is not ready for payment yet' : `is ${inv.status} and cannot be paid`
  return page('Invoice cannot be paid', 'This invoice cannot be paid', `<p>Invoice ${esc(inv.number ?? inv.id)} ${why}.</p>`)
}

/** Reads the whole request body as text (at most 1 MB). */
function readBody(req) {
  return new Promise((done, fail) => {
    const chunks = []
    let size = 0
    req.on('data', (c) => {
      size += c.length
      if (size > 1 << 20) { fail(new Error('body too large')); req.destroy() }
      else chunks.push(c)
    })
    req.on('end', () => done(Buffer.concat(chunks).toString('utf8')))
    req.on('error', fail)
  })
}

/**
 * Starts the fake on `host`:`port` (0 picks a free port), keeping state in `<dir>/state.json`.
 * Events are POSTed to `webhookUrl`, signed with `webhookSecret`, when a URL is given.
 * @param {{ port?: number, host?: string, dir: string, webhookUrl?: string, webhookSecret?: string,
 *   publicBaseUrl?: string, apiKey?: string, log?: (msg: string) => void, retryBaseMs?: number }} opts
 *   publicBaseUrl: where browsers reach /pay (default: the fake's own URL); apiKey: one more key
 *   accepted besides any sk_test_…; retryBaseMs: first webhook retry delay (default 500, doubling).
 * @returns {Promise<{ port: number, url: string, close(): Promise<void> }>}
 */
export async function startPaymentFake({
  port = 0, host = '127.0.0.1', dir, webhookUrl, webhookSecret, publicBaseUrl, apiKey, log, retryBaseMs = 500,
}) {
  if (!dir) throw new Error('startPaymentFake: dir is required')
  if (webhookUrl && !webhookSecret) throw new Error('a webhook URL needs a webhook secret')
  const outDir = resolve(dir)
  mkdirSync(outDir, { recursive: true })
  const statePath = join(outDir, 'state.json')
  let state = freshState()
  if (existsSync(statePath)) {
    try { state = { ...freshState(), ...JSON.parse(readFileSync(statePath, 'utf8')) } }
    catch (err) { throw new Error(`${statePath} is not readable JSON (${err.message}); delete it to start afresh`) }
  }
  const save = () => writeAtomic(statePath, JSON.stringify(state))
  let base = ''
  let outage = false
  let closed = false

  // ---- webhook delivery: one queue, in order, retried with doubling delays, never blocking the API
  const queue = []
  let pumping = false
  let inflight = null
  let wake = null

  /** One signed POST of the event; resolves to { status } or { error }. */
  function deliverOnce(rec) {
    const payload = JSON.stringify(rec.event, null, 2)
    const t = now()
    const sig = createHmac('sha256', webhookSecret).update(`${t}.${payload}`, 'utf8').digest('hex')
    const target = new URL(webhookUrl)
    return new Promise((done) => {
      let settled = false
      const finish = (r) => { if (!settled) { settled = true; inflight = null; done(r) } }
      const req = (target.protocol === 'https:' ? https : http).request(target, {
        method: 'POST',
        agent: false,
        timeout: 10_000,
        headers: {
          'Content-Type': 'application/json',
          'Content-Length': Buffer.byteLength(payload),
          'Stripe-Signature': `t=${t},v1=${sig}`,
          'User-Agent': 'payment-fake/1 (webhooks)',
        },
      }, (res) => { res.resume(); finish({ status: res.statusCode }) })
      req.on('timeout', () => req.destroy(new Error('timed out after 10 s')))
      req.on('error', err => finish({ error: err.message }))
      inflight = req
      req.end(payload)
    })
  }
  const sleep = ms => new Promise((done) => {
    const timer = setTimeout(() => { wake = null; done() }, ms)
    wake = () => { clearTimeout(timer); wake = null; done() }
  })
  async function pump() {
    if (pumping || !webhookUrl) return
    pumping = true
    while (queue.length && !closed) {
      const id = queue[0]
      const rec = state.events.find(e => e.event.id === id)
      for (let attempt = 0; rec && attempt < MAX_ATTEMPTS && !closed; attempt++) {
        if (attempt) await sleep(retryBaseMs * 2 ** (attempt - 1))
        if (closed || !state.events.includes(rec)) break
        const r = await deliverOnce(rec)
        if (closed) break
        const ok = r.status >= 200 && r.status < 300
        Object.assign(rec, { attempts: rec.attempts + 1, last_status: r.status ?? null, last_error: r.error ?? null })
        if (ok) rec.delivered = true
        save()
        if (ok) break
        log?.(`[payments] webhook ${rec.event.type} ${rec.event.id}: ${r.error ?? `HTTP ${r.status}`} (attempt ${attempt + 1})`)
      }
      if (queue[0] === id) queue.shift()
    }
    pumping = false
  }
  const enqueue = (id) => {
    if (!webhookUrl) return
    queue.push(id)
    setImmediate(pump)
  }

  /** Records an event about the invoice (a snapshot, plus `extra` fields) and queues its delivery. */
  function emit(type, inv, ctx, extra = {}) {
    const event = {
      id: newId('evt'), object: 'event', api_version: API_VERSION, created: now(),
      data: { object: { ...structuredClone(inv), ...extra } }, livemode: false,
      pending_webhooks: webhookUrl ? 1 : 0,
      request: { id: ctx?.requestId ?? null, idempotency_key: ctx?.idempotencyKey ?? null }, type,
    }
    state.events.push({ event, delivered: false, attempts: 0, last_status: null, last_error: null })
    enqueue(event.id)
  }

  // ---- the provider's objects
  const getCustomer = id => state.customers[id] ?? (() => { throw noSuch('customer', id) })()
  const getInvoice = id => state.invoices[id] ?? (() => { throw noSuch('invoice', id) })()
  const getItem = id => state.invoiceItems[id] ?? (() => { throw noSuch('invoiceitem', id) })()
  const CUSTOMER_PARAMS = ['name', 'email', 'description', 'phone', 'metadata', 'address', 'preferred_locales', 'invoice_settings']
  // Accepted so the app may send them, but without effect here.
  const INVOICE_IGNORED = ['footer', 'custom_fields', 'statement_descriptor', 'payment_settings', 'rendering', 'automatic_tax',
    'default_tax_rates', 'account_tax_ids']
  const emptyToNull = v => (v === '' ? null : v)

  function recompute(inv) {
    inv.subtotal = inv.lines.data.reduce((sum, l) => sum + l.amount, 0)
    inv.subtotal_excluding_tax = inv.total = inv.total_excluding_tax = inv.subtotal
    inv.amount_due = Math.max(inv.total, 0)
    inv.amount_remaining = inv.amount_due - inv.amount_paid
  }
  function lineFor(item) {
    return {
      id: newId('il'), object: 'line_item', amount: item.amount, currency: item.currency, description: item.description,
      discount_amounts: [], discountable: true, discounts: [], invoice: item.invoice, livemode: false, metadata: item.metadata,
      parent: { type: 'invoice_item_details', subscription_item_details: null,
        invoice_item_details: { invoice_item: item.id, proration: false, proration_details: { credited_items: null }, subscription: null } },
      period: item.period, pretax_credit_amounts: [], pricing: null, quantity: item.quantity, subscription: null,
      subtotal: item.amount, taxes: [],
    }
  }
  function markPaid(inv, outOfBand) {
    Object.assign(inv, { status: 'paid', amount_paid: inv.amount_due, amount_remaining: 0, paid_out_of_band: outOfBand, attempted: true })
    inv.status_transitions.paid_at = now()
  }
  /** Throws the provider-style 400 unless the invoice is in one of `states`. */
  function need(inv, states, doing) {
    if (!states.includes(inv.status)) {
      const message = `Invoice ${inv.id} is ${inv.status}; you can only ${doing} an invoice that is ${states.join(' or ')}.`
      throw invalid(message, { code: 'invoice_unexpected_state' })
    }
  }

  function createInvoice(p) {
    only(p, ['customer', 'collection_method', 'days_until_due', 'due_date', 'currency', 'description', 'metadata', 'auto_advance',
      'pending_invoice_items_behavior', ...INVOICE_IGNORED])
    const customerId = str(p, 'customer')
    if (!customerId) throw invalid('Missing required param: customer.', { code: 'parameter_missing', param: 'customer' })
    const customer = state.customers[customerId]
    if (!customer) throw noSuch('customer', customerId, 'customer')
    const method = str(p, 'collection_method') ?? 'charge_automatically'
    if (!['charge_automatically', 'send_invoice'].includes(method)) {
      throw invalid(`Invalid collection_method: ${method}`, { param: 'collection_method' })
    }
    const days = int(p, 'days_until_due', 0)
    const due = int(p, 'due_date', 0)
    if (days !== undefined && due !== undefined) throw invalid('You may only specify one of these parameters: days_until_due, due_date.')
    if (method === 'send_invoice' && days === undefined && due === undefined) {
      throw invalid('Invoices with collection_method=send_invoice need days_until_due or due_date.', { param: 'days_until_due' })
    }
    if (method !== 'send_invoice' && (days ?? due) !== undefined) {
      const param = days === undefined ? 'due_date' : 'days_until_due'
      throw invalid(`${param} can only be set when collection_method is send_invoice.`, { param })
    }
    const created = now()
    const inv = {
      id: newId('in'), object: 'invoice', customer: customerId, customer_email: customer.email, customer_name: customer.name,
      status: 'draft', collection_method: method, currency: currency(p, 'usd'), description: emptyToNull(str(p, 'description') ?? null),
      amount_due: 0, amount_paid: 0, amount_remaining: 0, amount_overpaid: 0,
      subtotal: 0, subtotal_excluding_tax: 0, total: 0, total_excluding_tax: 0,
      lines: { object: 'list', data: [], has_more: false, total_count: 0, url: '' },
      metadata: mergeMetadata({}, p.metadata), hosted_invoice_url: null, invoice_pdf: null, number: null,
      days_until_due: days ?? null, due_date: due ?? (days === undefined ? null : created + days * 86400),
      auto_advance: bool(p, 'auto_advance') ?? false, attempted: false, attempt_count: 0, effective_at: null,
      created, period_start: created, period_end: created, last_finalization_error: null, livemode: false, paid_out_of_band: false,
      status_transitions: { finalized_at: null, marked_uncollectible_at: null, paid_at: null, voided_at: null },
    }
    inv.lines.url = `/v1/invoices/${inv.id}/lines`
    const pending = str(p, 'pending_invoice_items_behavior') ?? 'exclude'
    if (!['include', 'exclude'].includes(pending)) {
      throw invalid(`Invalid pending_invoice_items_behavior: ${pending}`, { param: 'pending_invoice_items_behavior' })
    }
    state.invoices[inv.id] = inv
    if (pending === 'include') {
      for (const item of Object.values(state.invoiceItems)) {
        if (item.customer === customerId && !item.invoice && item.currency === inv.currency) {
          item.invoice = inv.id
          inv.lines.data.push(lineFor(item))
        }
      }
    }
    recompute(inv)
    inv.lines.total_count = inv.lines.data.length
    return inv
  }

  function createItem(p) {
    only(p, ['customer', 'invoice', 'amount', 'unit_amount_decimal', 'quantity', 'currency', 'description', 'metadata', 'period', 'discountable'])
    const customerId = str(p, 'customer')
    if (!customerId) throw invalid('Missing required param: customer.', { code: 'parameter_missing', param: 'customer' })
    if (!state.customers[customerId]) throw noSuch('customer', customerId, 'customer')
    const invoiceId = str(p, 'invoice')
    const inv = invoiceId ? state.invoices[invoiceId] : null
    if (invoiceId && !inv) throw noSuch('invoice', invoiceId, 'invoice')
    if (inv && inv.customer !== customerId) throw invalid(`Invoice ${inv.id} belongs to another customer.`, { param: 'invoice' })
    if (inv && inv.status !== 'draft') {
      throw invalid(`Invoice ${inv.id} is ${inv.status}; items can only be added to a draft invoice.`, { param: 'invoice', code: 'invoice_not_editable' })
    }
    let amount = int(p, 'amount')
    const quantity = int(p, 'quantity', 0)
    const unit = str(p, 'unit_amount_decimal')
    if (amount !== undefined && (quantity !== undefined || unit !== undefined)) {
      throw invalid(`You may only specify one of these parameters: amount, ${quantity !== undefined ? 'quantity' : 'unit_amount_decimal'}.`)
    }
    if (amount === undefined) {
      if (unit === undefined || !/^-?\d+(\.\d+)?$/.test(unit)) {
        throw invalid('Missing required param: amount (or unit_amount_decimal with quantity).', { code: 'parameter_missing', param: 'amount' })
      }
      amount = Math.round(Number(unit) * (quantity ?? 1))
    }
    const cur = currency(p, inv?.currency)
    if (inv && cur !== inv.currency) {
      throw invalid(`The currency ${cur} does not match the invoice's currency ${inv.currency}.`, { param: 'currency' })
    }
    const t = now()
    const period = p.period ? { start: int(p.period, 'start') ?? t, end: int(p.period, 'end') ?? t } : { start: t, end: t }
    const item = {
      id: newId('ii'), object: 'invoiceitem', amount, currency: cur, customer: customerId, date: t,
      description: emptyToNull(str(p, 'description') ?? null), discountable: bool(p, 'discountable') ?? true, discounts: [],
      invoice: inv?.id ?? null, livemode: false, metadata: mergeMetadata({}, p.metadata), parent: null, period,
      pricing: null, proration: false, quantity: quantity ?? 1, tax_rates: [], test_clock: null,
    }
    state.invoiceItems[item.id] = item
    if (inv) {
      inv.lines.data.push(lineFor(item))
      inv.lines.total_count = inv.lines.data.length
      recompute(inv)
    }
    return item
  }

  function deleteItem(item) {
    const inv = item.invoice ? state.invoices[item.invoice] : null
    if (inv && inv.status !== 'draft') {
      throw invalid(`Invoice ${inv.id} is ${inv.status}; its items can no longer be deleted.`, { code: 'invoice_not_editable' })
    }
    delete state.invoiceItems[item.id]
    if (inv) {
      inv.lines.data = inv.lines.data.filter(l => l.parent?.invoice_item_details?.invoice_item !== item.id)
      inv.lines.total_count = inv.lines.data.length
      recompute(inv)
    }
    return { id: item.id, object: 'invoiceitem', deleted: true }
  }

  function deleteInvoice(inv) {
    if (inv.status !== 'draft') throw invalid(`Invoice ${inv.id} is ${inv.status}; only a draft can be deleted (void it instead).`)
    for (const item of Object.values(state.invoiceItems)) if (item.invoice === inv.id) delete state.invoiceItems[item.id]
    delete state.invoices[inv.id]
    return { id: inv.id, object: 'invoice', deleted: true }
  }

  function updateInvoice(inv, p) {
    only(p, ['description', 'metadata', 'due_date', 'days_until_due', 'auto_advance', ...INVOICE_IGNORED])
    const draftOnly = ['due_date', 'days_until_due', 'auto_advance'].find(k => p[k] !== undefined)
    if (draftOnly && inv.status !== 'draft') {
      throw invalid(`Invoice ${inv.id} is ${inv.status}; ${draftOnly} can only change on a draft.`, { param: draftOnly })
    }
    const due = int(p, 'due_date', 0)
    const days = int(p, 'days_until_due', 0)
    if (days !== undefined && due !== undefined) throw invalid('You may only specify one of these parameters: days_until_due, due_date.')
    const description = str(p, 'description')
    const autoAdvance = bool(p, 'auto_advance')
    const metadata = mergeMetadata(inv.metadata, p.metadata)
    // Everything is checked above; only now does the invoice change.
    if (days !== undefined) Object.assign(inv, { days_until_due: days, due_date: now() + days * 86400 })
    if (due !== undefined) Object.assign(inv, { days_until_due: null, due_date: due })
    if (description !== undefined) inv.description = emptyToNull(description)
    Object.assign(inv, { auto_advance: autoAdvance ?? inv.auto_advance, metadata })
    return inv
  }

  /** finalize / send / pay / void / mark_uncollectible: the invoice's state machine. */
  function invoiceAction(inv, action, p, ctx) {
    const t = now()
    if (action === 'finalize') {
      only(p, ['auto_advance'])
      need(inv, ['draft'], 'finalize')
      inv.number = `FAKE-${String(++state.counters.invoiceNumber).padStart(4, '0')}`
      Object.assign(inv, { status: 'open', hosted_invoice_url: `${base}/pay/${inv.id}`, effective_at: t })
      if (inv.days_until_due !== null) inv.due_date = t + inv.days_until_due * 86400
      inv.status_transitions.finalized_at = t
      emit('invoice.finalized', inv, ctx)
      // Like the provider: an invoice with nothing to pay is paid the moment it is finalized.
      if (inv.amount_due === 0) { markPaid(inv, false); emit('invoice.paid', inv, ctx) }
    }
    else if (action === 'send') {
      only(p, [])
      need(inv, ['open'], 'send')
      if (inv.collection_method !== 'send_invoice') throw invalid('You can only send an invoice whose collection_method is send_invoice.')
      emit('invoice.sent', inv, ctx)
    }
    else if (action === 'pay') {
      only(p, ['paid_out_of_band', 'payment_method', 'source', 'forgive', 'off_session', 'mandate'])
      need(inv, ['open', 'uncollectible'], 'pay')
      if (!bool(p, 'paid_out_of_band')) {
        const message = 'The fake has no saved cards: pay on the hosted_invoice_url page, or pass paid_out_of_band=true.'
        throw new ApiError(402, 'card_error', message, { code: 'payment_method_missing' })
      }
      markPaid(inv, true)
      emit('invoice.paid', inv, ctx)
    }
    else if (action === 'void') {
      only(p, [])
      need(inv, ['open', 'uncollectible'], 'void')
      inv.status = 'void'
      inv.status_transitions.voided_at = t
      emit('invoice.voided', inv, ctx)
    }
    else {
      only(p, [])
      need(inv, ['open'], 'mark uncollectible')
      inv.status = 'uncollectible'
      inv.status_transitions.marked_uncollectible_at = t
      emit('invoice.marked_uncollectible', inv, ctx)
    }
    return inv
  }

  function listInvoices(p) {
    only(p, ['customer', 'status', 'limit', 'starting_after', 'collection_method'])
    const limit = int(p, 'limit', 1) ?? 10
    if (limit > 100) throw invalid('limit must be at most 100', { param: 'limit' })
    let all = Object.values(state.invoices).reverse().sort((a, b) => b.created - a.created)
    for (const k of ['customer', 'status', 'collection_method']) if (p[k] !== undefined) all = all.filter(i => i[k] === p[k])
    if (p.starting_after !== undefined) {
      const at = all.findIndex(i => i.id === p.starting_after)
      if (at < 0) throw noSuch('invoice', String(p.starting_after), 'starting_after')
      all = all.slice(at + 1)
    }
    return { object: 'list', data: all.slice(0, limit), has_more: all.length > limit, url: '/v1/invoices' }
  }

  /** The /v1 routes: [method, pattern, handler(params, ctx, ...captures) → body]. */
  const routes = [
    ['POST', /^\/v1\/customers$/, (p) => {
      only(p, CUSTOMER_PARAMS)
      const c = { id: newId('cus'), object: 'customer', name: emptyToNull(str(p, 'name') ?? null), email: emptyToNull(str(p, 'email') ?? null),
        description: emptyToNull(str(p, 'description') ?? null), phone: emptyToNull(str(p, 'phone') ?? null),
        metadata: mergeMetadata({}, p.metadata), balance: 0, currency: null, created: now(), livemode: false }
      return (state.customers[c.id] = c)
    }],
    ['GET', /^\/v1\/customers\/([^/]+)$/, (p, ctx, id) => getCustomer(id)],
    ['POST', /^\/v1\/customers\/([^/]+)$/, (p, ctx, id) => {
      const c = getCustomer(id)
      only(p, CUSTOMER_PARAMS)
      const metadata = mergeMetadata(c.metadata, p.metadata)
      const fields = ['name', 'email', 'description', 'phone'].filter(k => p[k] !== undefined).map(k => [k, emptyToNull(str(p, k))])
      return Object.assign(c, Object.fromEntries(fields), { metadata })
    }],
    ['POST', /^\/v1\/invoices$/, createInvoice],
    ['GET', /^\/v1\/invoices$/, listInvoices],
    ['GET', /^\/v1\/invoices\/([^/]+)$/, (p, ctx, id) => getInvoice(id)],
    ['POST', /^\/v1\/invoices\/([^/]+)$/, (p, ctx, id) => updateInvoice(getInvoice(id), p)],
    ['DELETE', /^\/v1\/invoices\/([^/]+)$/, (p, ctx, id) => deleteInvoice(getInvoice(id))],
    ['POST', /^\/v1\/invoices\/([^/]+)\/(finalize|send|pay|void|mark_uncollectible)$/,
      (p, ctx, id, action) => invoiceAction(getInvoice(id), action, p, ctx)],
    ['POST', /^\/v1\/invoiceitems$/, createItem],
    ['GET', /^\/v1\/invoiceitems\/([^/]+)$/, (p, ctx, id) => getItem(id)],
    ['DELETE', /^\/v1\/invoiceitems\/([^/]+)$/, (p, ctx, id) => deleteItem(getItem(id))],
  ]

  /** Authenticates, honours Idempotency-Key, routes, persists and answers one /v1 request. */
  function api(req, res, url, raw) {
    const requestId = newId('req')
    const headers = { 'Request-Id': requestId, 'Stripe-Version': req.headers['stripe-version'] || API_VERSION }
    const send = (status, text, extra = {}) => {
      res.writeHead(status, { 'Content-Type': 'application/json', 'Content-Length': Buffer.byteLength(text), ...headers, ...extra })
      res.end(text)
    }
    const fail = err => send(err.status, JSON.stringify(err.body, null, 2))
    const auth = req.headers.authorization ?? ''
    const key = /^Bearer /i.test(auth) ? auth.slice(7).trim()
      : /^Basic /i.test(auth) ? Buffer.from(auth.slice(6), 'base64').toString().split(':')[0] : ''
    if (!key) {
      return fail(new ApiError(401, 'authentication_error', 'You did not provide an API key. Send it as "Authorization: Bearer sk_test_…".'))
    }
    if (!key.startsWith('sk_test_') && key !== apiKey) {
      const shown = key.length > 12 ? `${key.slice(0, 8)}${'*'.repeat(key.length - 12)}${key.slice(-4)}` : `${key.slice(0, 3)}***`
      return fail(new ApiError(401, 'authentication_error', `Invalid API Key provided: ${shown}`))
    }
    const idempotencyKey = req.method === 'POST' ? req.headers['idempotency-key'] : undefined
    const fingerprint = createHash('sha256').update(`${req.method} ${url.pathname}${url.search}\n${raw}`).digest('hex')
    if (idempotencyKey) {
      headers['Idempotency-Key'] = idempotencyKey
      const seen = state.idempotency[idempotencyKey]
      if (seen && seen.fingerprint !== fingerprint) {
        return fail(new ApiError(400, 'idempotency_error', 'Keys for idempotent requests can only be used with the same parameters they '
          + `were first used with. Try using a key other than '${idempotencyKey}' if you meant to execute a different request.`))
      }
      if (seen) return send(seen.status, seen.body, { 'Idempotent-Replayed': 'true', 'Original-Request': seen.requestId })
    }
    let status = 200
    let body
    const route = routes.find(([m, re]) => m === req.method && re.test(url.pathname))
    try {
      if (!route) throw new ApiError(404, 'invalid_request_error', `Unrecognized request URL (${req.method}: ${url.pathname}).`)
      const params = parseForm([url.search.slice(1), req.method === 'POST' ? raw : ''].filter(Boolean).join('&'))
      body = route[2](params, { requestId, idempotencyKey }, ...route[1].exec(url.pathname).slice(1).map(decodeURIComponent))
    }
    catch (err) {
      if (!(err instanceof ApiError)) log?.(`[payments] ${err.stack ?? err}`)
      const e = err instanceof ApiError ? err : new ApiError(500, 'api_error', 'The fake failed unexpectedly; see its log.')
      status = e.status
      body = e.body
    }
    const text = JSON.stringify(body, null, 2)
    if (idempotencyKey && route) {
      const cutoff = now() - IDEMPOTENCY_TTL_S
      for (const [k, v] of Object.entries(state.idempotency)) if (v.created < cutoff) delete state.idempotency[k]
      state.idempotency[idempotencyKey] = { fingerprint, status, body: text, requestId, created: now() }
    }
    if (req.method !== 'GET') save()
    send(status, text)
  }

  /** GET shows the payment page; POST takes the test card and pays (or declines) the invoice. */
  function pay(req, res, id, raw) {
    const html = (status, text) => {
      res.writeHead(status, { 'Content-Type': 'text/html; charset=utf-8', 'Cache-Control': 'no-store' })
      res.end(text)
    }
    const inv = state.invoices[id]
    if (!inv) return html(404, page('Invoice not found', 'Invoice not found', '<p>There is no invoice at this link.</p>'))
    const payable = ['open', 'uncollectible'].includes(inv.status)
    if (!payable) return html(req.method === 'GET' ? 200 : 409, inv.status === 'paid' ? paidPage(inv, 'This invoice is paid') : notPayablePage(inv))
    if (req.method !== 'POST') return html(200, payForm(inv))
    const card = (new URLSearchParams(raw).get('card') ?? '').replace(/[\s-]/g, '')
    if (card === TEST_CARDS.good) {
      markPaid(inv, false)
      emit('invoice.payment_succeeded', inv, null)
      emit('invoice.paid', inv, null)
      save()
      return html(200, paidPage(inv, 'Payment received', true))
    }
    if (card === TEST_CARDS.declined) {
      Object.assign(inv, { attempted: true, attempt_count: inv.attempt_count + 1 })
      const lastPaymentError = { code: 'card_declined', decline_code: 'generic_decline', message: 'Your card was declined.', type: 'card_error' }
      emit('invoice.payment_failed', inv, null, { last_payment_error: lastPaymentError })
      save()
      return html(402, payForm(inv, 'Your card was declined.'))
    }
    return html(400, payForm(inv, 'Use one of the test cards.'))
  }

  /** Test controls under /__fake/ (loopback only, no auth). */
  function controls(req, res, url, raw) {
    const json = (status, body) => {
      const text = JSON.stringify(body, null, 2)
      res.writeHead(status, { 'Content-Type': 'application/json', 'Content-Length': Buffer.byteLength(text) })
      res.end(text)
    }
    if (!LOOPBACK.has(req.socket.remoteAddress ?? '')) return json(403, { error: 'loopback only' })
    const path = url.pathname
    if (req.method === 'GET' && path === '/__fake/health') return json(200, { ok: true })
    if (req.method === 'GET' && path === '/__fake/events') {
      const type = url.searchParams.get('type')
      const invoice = url.searchParams.get('invoice')
      const data = state.events
        .filter(r => (!type || r.event.type === type) && (!invoice || r.event.data.object.id === invoice))
        .map(r => ({ ...r.event, delivered: r.delivered, attempts: r.attempts, last_status: r.last_status, last_error: r.last_error }))
      return json(200, { object: 'list', data })
    }
    const redeliver = /^\/__fake\/events\/([^/]+)\/redeliver$/.exec(path)
    if (req.method === 'POST' && redeliver) {
      if (!webhookUrl) return json(400, { error: 'no webhook URL is configured' })
      if (!state.events.some(r => r.event.id === redeliver[1])) return json(404, { error: `no event ${redeliver[1]}` })
      enqueue(redeliver[1])
      return json(202, { ok: true, id: redeliver[1] })
    }
    if (req.method === 'POST' && path === '/__fake/outage') {
      let body
      try { body = JSON.parse(raw || '{}') }
      catch { return json(400, { error: 'send JSON: { "down": true|false }' }) }
      if (typeof body.down !== 'boolean') return json(400, { error: 'send JSON: { "down": true|false }' })
      outage = body.down
      log?.(`[payments] outage ${outage ? 'on' : 'off'}`)
      return json(200, { down: outage })
    }
    if (req.method === 'POST' && path === '/__fake/reset') {
      state = freshState()
      queue.length = 0
      save()
      return json(200, { ok: true })
    }
    return json(404, { error: `no test control ${req.method} ${path}` })
  }

  const server = http.createServer((req, res) => {
    const started = Date.now()
    const url = new URL(req.url ?? '/', 'http://fake.invalid')
    if (log) res.on('finish', () => log(`[payments] ${req.method} ${url.pathname}${url.search} ${res.statusCode} ${Date.now() - started}ms`))
    // An outage as the app sees it: the connection drops without an answer.
    if (outage && url.pathname.startsWith('/v1')) {
      log?.(`[payments] ${req.method} ${url.pathname} dropped (outage)`)
      req.socket.destroy()
      return
    }
    readBody(req).then((raw) => {
      if (url.pathname.startsWith('/__fake/')) return controls(req, res, url, raw)
      const payMatch = /^\/pay\/([\w-]+)$/.exec(url.pathname)
      if (payMatch) return pay(req, res, payMatch[1], raw)
      if (url.pathname.startsWith('/v1/')) return api(req, res, url, raw)
      const text = JSON.stringify({ error: { type: 'invalid_request_error', message: `Unrecognized request URL (${req.method}: ${url.pathname}).` } })
      res.writeHead(404, { 'Content-Type': 'application/json' })
      res.end(text)
    }).catch((err) => {
      log?.(`[payments] ${err.stack ?? err}`)
      if (!res.headersSent) { res.writeHead(500, { 'Content-Type': 'text/plain' }); res.end('internal error') }
    })
  })

  await new Promise((done, fail) => {
    const onError = (err) => {
      fail(err.code === 'EADDRINUSE' ? new Error(`${host}:${port} is already in use`) : err)
    }
    server.once('error', onError)
    server.listen(port, host, () => { server.removeListener('error', onError); done() })
  })
  server.on('error', err => log?.(`[payments] ${err.message}`))
  const actualPort = /** @type {import('node:net').AddressInfo} */ (server.address()).port
  const url = `http://${host.includes(':') ? `[${host}]` : host}:${actualPort}`
  base = (publicBaseUrl ?? url).replace(/\/+$/, '')
  // Hosted links follow the current address; then resume deliveries that never got through.
  for (const inv of Object.values(state.invoices)) if (inv.hosted_invoice_url) inv.hosted_invoice_url = `${base}/pay/${inv.id}`
  save()
  for (const r of state.events) if (!r.delivered && r.attempts < MAX_ATTEMPTS) enqueue(r.event.id)

  return {
    port: actualPort,
    url,
    close: () => new Promise((done) => {
      closed = true
      wake?.()
      inflight?.destroy()
      server.close(() => done())
      server.closeAllConnections()
    }),
  }
}

async function main() {
  const port = Number(argValue('--port') ?? process.env.RILLBOOK_PAYMENTS_PORT ?? 12111)
  const dir = resolve(argValue('--dir') ?? process.env.RILLBOOK_PAYMENTS_DIR ?? '.data/payments')
  if (!Number.isInteger(port) || port < 1 || port > 65535) throw new Error(`not a port: ${port}`)
  const verbose = process.argv.includes('--verbose')
  const fake = await startPaymentFake({
    port,
    dir,
    webhookUrl: argValue('--webhook-url') ?? process.env.RILLBOOK_PAYMENTS_WEBHOOK_URL,
    webhookSecret: argValue('--webhook-secret') ?? process.env.STRIPE_WEBHOOK_SECRET ?? installWebhookSecret(dir),
    publicBaseUrl: argValue('--public-url') ?? process.env.RILLBOOK_PAYMENTS_PUBLIC_URL,
    apiKey: argValue('--api-key'),
    log: verbose ? msg => process.stderr.write(`${msg}\n`) : undefined,
  })
  process.stdout.write(`[payments] fake payment provider on ${fake.url} (state in ${dir})\n`)
  runUntilStopped(join(dir, 'fake.pid'), () => fake.close())
}

if (isMain(import.meta.url)) {
  main().catch((err) => {
    process.stderr.write(`[payments] ${err.message}\n`)
    process.exit(1)
  })
}
