import { readFileSync, statSync } from 'node:fs'
import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'

let owner: string
beforeAll(async () => { owner = await tokenFor(demo.owner) })

describe('error responses', () => {
  it('carry the text in `message` and a plain reason phrase in `statusMessage`, with no h3 warning in the log', async () => {
    const log = inject('serverLog')
    const from = statSync(log).size
    const invalid = await api('/api/customers', { method: 'POST', token: owner, body: {} })
    expect(invalid.status).toBe(400)
    expect(invalid.body).toMatchObject({ statusCode: 400, statusMessage: 'Bad Request' })
    expect(invalid.body.message).toMatch(/^Invalid body: .+ — /)
    expect(Object.keys(invalid.body.data.fields).length).toBeGreaterThan(0)
    const missing = await api(`/api/customers/${randomUUID()}`, { token: owner })
    expect(missing.status).toBe(404)
    expect(missing.body).toMatchObject({ statusCode: 404, statusMessage: 'Not Found' })
    expect(missing.body.message).toBeTruthy()
    const unsigned = await fetch(`${baseUrl()}/api/webhooks/payments`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })
    expect(unsigned.status).toBe(400)
    expect((await unsigned.json()).message).toContain('stripe-signature — missing')
    for (let i = 0; i < 3; i++) await api('/api/customers', { method: 'POST', token: owner, body: { name: '' } })
    await new Promise(r => setTimeout(r, 300))
    const written = readFileSync(log).subarray(from).toString('utf8')
    expect(written).not.toMatch(/statusMessage/)
  })
})
