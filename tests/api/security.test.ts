import { readFileSync } from 'node:fs'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { api, baseUrl, demo, tokenFor, uniqueEmail } from '../helpers/api'

let owner: string
beforeAll(async () => { owner = await tokenFor(demo.owner) })

describe('security headers', () => {
  it('pages carry a nonce-based CSP and the usual hardening headers', async () => {
    const r = await fetch(`${baseUrl()}/login`)
    const csp = r.headers.get('content-security-policy')!
    const nonce = csp.match(/'nonce-([^']+)'/)?.[1]
    expect(nonce).toBeTruthy()
    expect(nonce).not.toBe('{{nonce}}')
    expect(csp).toMatch(/object-src 'none'/)
    expect(csp).toMatch(/frame-ancestors 'none'/)
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/)
    const html = await r.text()
    expect(html).toContain(`nonce="${nonce}"`)
    expect(r.headers.get('x-frame-options')).toBe('DENY')
    expect(r.headers.get('x-content-type-options')).toBe('nosniff')
    expect(r.headers.get('referrer-policy')).toBe('same-origin')
    expect(r.headers.get('x-powered-by')).toBeNull()
    // Every page load gets a fresh nonce.
    const again = (await fetch(`${baseUrl()}/login`)).headers.get('content-security-policy')!
    expect(again.match(/'nonce-([^']+)'/)?.[1]).not.toBe(nonce)
  })
})

describe('cross-site request forgery', () => {
  it('refuses a cookie-authenticated change from another site, allows it from this one', async () => {
    const body = JSON.stringify({ name: 'Forged Customer', kind: 'household' })
    const forged = await fetch(`${baseUrl()}/api/customers`, { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': `auth.token=${owner}`, 'origin': 'https://attacker.example', 'sec-fetch-site': 'cross-site' }, body })
    expect(forged.status).toBe(403)
    const noSite = await fetch(`${baseUrl()}/api/customers`, { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': `auth.token=${owner}`, 'origin': 'https://attacker.example' }, body })
    expect(noSite.status).toBe(403)
    const list = await api('/api/customers?q=Forged%20Customer', { token: owner })
    expect(list.body.total).toBe(0)
    const own = await fetch(`${baseUrl()}/api/customers`, { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': `auth.token=${owner}`, 'origin': new URL(baseUrl()).origin, 'sec-fetch-site': 'same-origin' }, body: JSON.stringify({ name: 'Same Site Customer', kind: 'household' }) })
    expect(own.status).toBe(201)
  })
})

describe('request limits', () => {
  it('a JSON body over 1 MB is 413 and writes nothing', async () => {
    const r = await fetch(`${baseUrl()}/api/customers`, { method: 'POST', headers: { 'content-type': 'application/json', 'authorization': `Bearer ${owner}` }, body: JSON.stringify({ name: 'x'.repeat(1_100_000), kind: 'household' }) })
    expect(r.status).toBe(413)
  })
})

describe('passwords and sessions', () => {
  it('refuses short and common passwords with a message naming the field', async () => {
    for (const password of ['short', '1234567890', 'Password123', 'aaaaaaaaaaaa']) {
      const r = await api('/api/users', { method: 'POST', token: owner, body: { email: uniqueEmail('weak'), name: 'Weak Password', role: 'technician', password } })
      expect(r.status, password).toBe(400)
      expect(r.body.message).toMatch(/password/)
    }
  })
})

describe('logs', () => {
  it('never contain passwords, session tokens or gate codes', async () => {
    const wrong = 'Wr0ng-Secret-Pass-42!'
    await api('/api/auth/login', { method: 'POST', body: { email: demo.owner, password: wrong } })
    await api('/api/auth/session', { token: 'forged-token-not-a-session-9f3a' })
    const site = (await api('/api/sites?pageSize=1', { token: owner })).body.rows[0]
    const full = (await api(`/api/sites/${site.id}`, { token: owner })).body
    await new Promise(r => setTimeout(r, 300))
    const log = readFileSync(inject('serverLog'), 'utf8')
    expect(log).not.toContain(wrong)
    expect(log).not.toContain('demo-pond-2026')
    expect(log).not.toContain(owner)
    expect(log).not.toContain('forged-token-not-a-session-9f3a')
    if (full.gateCode) expect(log).not.toContain(full.gateCode)
  })
})
