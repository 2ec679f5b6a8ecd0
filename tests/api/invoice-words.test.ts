import { readdirSync, readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'

// The payment provider's invoice states live only in the payments adapter (server/utils/payment*.ts);
// neither the client bundle nor any API response the demo company sees names them.
const PROVIDER_WORDS = /uncollectible|\bvoid(ed)?\b/i
// In minified code `void 0` is an operator and zod's schema walker has a `case "void":` of its
// own, so the bundle is searched for the word as a string that is not a type name of the language.
const PROVIDER_WORDS_IN_CODE = /uncollectible|(?<!case)["'`]void(ed)?["'`]|\bvoid(ed)? invoice|\bVoid\b/g
// An invoice status compared or set to the provider's draft/open, in the invoice screens' code.
const PROVIDER_STATUS_IN_CODE = /status\s*[!=]==?\s*["'`](draft|open)["'`]|["'`](draft|open)["'`]\s*[!=]==?\s*\w+\.status/g
// As an invoice's status value: "draft" and "open" are also words of other things (contracts,
// alerts, requests), so only a status field of an invoice counts.
const PROVIDER_STATUS_VALUES = new Set(['draft', 'open', 'void', 'uncollectible'])

function statusValues(body: unknown): string[] {
  const found: string[] = []
  const walk = (v: unknown) => {
    if (Array.isArray(v)) return v.forEach(walk)
    if (v && typeof v === 'object') {
      for (const [k, x] of Object.entries(v)) {
        if (k === 'status' && typeof x === 'string') found.push(x)
        walk(x)
      }
    }
  }
  walk(body)
  return found
}

describe('invoice states in our own words', () => {
  it('the built client bundle names none of the provider\'s invoice states', () => {
    const dir = new URL('../../.output/public/_nuxt/', import.meta.url)
    const files = readdirSync(dir).filter(f => f.endsWith('.js'))
    expect(files.length).toBeGreaterThan(0)
    const hits = files.flatMap((f) => {
      const text = readFileSync(new URL(f, dir), 'utf8')
      const m = [...text.matchAll(PROVIDER_WORDS_IN_CODE)].map(x => x[0])
      // Only chunks of invoice screens: alerts and requests have an "open" status of their own.
      if (text.includes('invoice-status') || text.includes('/api/invoices')) m.push(...[...text.matchAll(PROVIDER_STATUS_IN_CODE)].map(x => x[0]))
      return m.length ? [`${f}: ${[...new Set(m)].join(', ')}`] : []
    })
    expect(hits).toEqual([])
    // The bundle does carry ours (the test can fail: it reads the right files).
    expect(files.some(f => readFileSync(new URL(f, dir), 'utf8').includes('Written off'))).toBe(true)
  })

  it('the demo company\'s invoice, portal, revenue, CSV and audit responses use only our words', async () => {
    const owner = await tokenFor(demo.owner)
    const customer = await tokenFor(demo.priya)
    const list = await api('/api/invoices?pageSize=100', { token: owner })
    expect(list.status).toBe(200)
    expect(list.body.rows.length).toBeGreaterThan(0)
    const one = await api(`/api/invoices/${list.body.rows[0].id}`, { token: owner })
    expect(one.status).toBe(200)
    const portal = await api('/api/invoices?pageSize=100', { token: customer })
    expect(portal.status).toBe(200)
    expect(portal.body.rows.length).toBeGreaterThan(0)
    const revenue = await api('/api/revenue', { token: owner })
    expect(revenue.status).toBe(200)
    const audit = await api('/api/audit?pageSize=100', { token: owner })
    expect(audit.status).toBe(200)
    const csv = await fetch(`${baseUrl()}/api/exports/invoices.csv`, { headers: { authorization: `Bearer ${owner}` } })
    expect(csv.status).toBe(200)
    const csvText = await csv.text()
    expect(csvText.split('\n')[0]).toContain('status')

    for (const [what, body] of Object.entries({ list: list.body, one: one.body, portal: portal.body, revenue: revenue.body, audit: audit.body })) {
      expect(JSON.stringify(body), what).not.toMatch(PROVIDER_WORDS)
    }
    for (const body of [list.body, one.body, portal.body]) {
      expect(statusValues(body).filter(s => PROVIDER_STATUS_VALUES.has(s))).toEqual([])
    }
    expect(csvText).not.toMatch(PROVIDER_WORDS)
    const statusColumn = csvText.trim().split('\n').slice(1).map(l => l.split(',')[1])
    expect(statusColumn.length).toBeGreaterThan(0)
    expect(statusColumn.filter(s => /^"?(draft|open)"?$/i.test(s!))).toEqual([])
    expect(new Set(list.body.rows.map((r: { status: string }) => r.status))).toContain('due')
  })
})
