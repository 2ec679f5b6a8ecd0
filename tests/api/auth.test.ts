import { describe, expect, it } from 'vitest'
import { api, demo, DEMO_PASSWORD, tokenFor, uniqueEmail } from '../helpers/api'

describe('sign-in', () => {
  it('signs in the demo owner and returns a bearer token; the session names the role', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: demo.owner, password: DEMO_PASSWORD } })
    expect(r.status).toBe(200)
    expect(r.body.token).toMatch(/^[\w-]{40,}$/)
    const s = await api('/api/auth/session', { token: r.body.token })
    expect(s.status).toBe(200)
    expect(s.body).toMatchObject({ email: demo.owner, role: 'owner', name: 'Mara Ellison' })
    expect(s.body).not.toHaveProperty('passwordHash')
  })

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: `  ${demo.tess.toUpperCase()} `, password: DEMO_PASSWORD } })
    expect(r.status).toBe(200)
  })

  it('rejects a wrong password with 401 and a clear message', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: demo.dario, password: 'not-the-password' } })
    expect(r.status).toBe(401)
    expect(r.body.message).toBe('Wrong e-mail or password')
    expect(r.body.token).toBeUndefined()
  })

  it('rejects an unknown e-mail the same way', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: 'nobody@nowhere.example', password: DEMO_PASSWORD } })
    expect(r.status).toBe(401)
    expect(r.body.message).toBe('Wrong e-mail or password')
  })

  it('answers bad input with 400 naming the field, and broken JSON with 400', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: 'not-an-email', password: '' } })
    expect(r.status).toBe(400)
    expect(r.body.data.fields).toMatchObject({ email: expect.any(String), password: expect.any(String) })
    expect(r.body.message).toMatch(/email/)
    const broken = await api('/api/auth/login', { method: 'POST', body: '{"email":' })
    expect(broken.status).toBe(400)
  })

  it('locks an account after five failures, refuses even the right password, and logs it', async () => {
    const owner = await tokenFor(demo.owner)
    const email = uniqueEmail('lockout')
    const password = 'a-good-long-password'
    const created = await api('/api/users', { method: 'POST', token: owner, body: { email, name: 'Lockout Test', role: 'technician', password } })
    expect(created.status).toBe(201)
    for (let i = 0; i < 5; i++) {
      const r = await api('/api/auth/login', { method: 'POST', body: { email, password: `wrong-${i}` } })
      expect(r.status).toBe(401)
    }
    const locked = await api('/api/auth/login', { method: 'POST', body: { email, password } })
    expect(locked.status).toBe(429)
    expect(locked.body.message).toMatch(/locked/)
    const audit = await api(`/api/audit?subjectId=${created.body.id}`, { token: owner })
    expect(audit.status).toBe(200)
    const actions = audit.body.rows.map((r: { action: string }) => r.action)
    expect(actions).toContain('sign_in.locked')
    expect(actions.filter((a: string) => a === 'sign_in.failure')).toHaveLength(5)
    expect(actions).toContain('sign_in.refused_locked')
  })

  it('refuses an address after repeated failures across accounts (per-address limit)', async () => {
    const headers = { 'x-forwarded-for': '203.0.113.77' }
    let last = 0
    for (let i = 0; i < 31; i++) {
      last = (await api('/api/auth/login', { method: 'POST', headers, body: { email: `guess${i}@nowhere.example`, password: 'guess-guess' } })).status
    }
    expect(last).toBe(429)
    const right = await api('/api/auth/login', { method: 'POST', headers, body: { email: demo.owner, password: DEMO_PASSWORD } })
    expect(right.status).toBe(429)
    // Another address is unaffected.
    const other = await api('/api/auth/login', { method: 'POST', headers: { 'x-forwarded-for': '203.0.113.78' }, body: { email: demo.owner, password: DEMO_PASSWORD } })
    expect(other.status).toBe(200)
  })
})

describe('sessions', () => {
  it('sign-out revokes the token', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: demo.priya, password: DEMO_PASSWORD } })
    const token = r.body.token
    expect((await api('/api/auth/session', { token })).status).toBe(200)
    expect((await api('/api/auth/logout', { method: 'POST', token })).status).toBe(200)
    expect((await api('/api/auth/session', { token })).status).toBe(401)
  })

  it('deactivation ends the user\'s sessions and blocks sign-in; reactivation restores sign-in', async () => {
    const owner = await tokenFor(demo.owner)
    const email = uniqueEmail('deactivate')
    const password = 'another-long-password'
    const created = await api('/api/users', { method: 'POST', token: owner, body: { email, name: 'Soon Gone', role: 'technician', password } })
    const login = await api('/api/auth/login', { method: 'POST', body: { email, password } })
    expect((await api('/api/today', { token: login.body.token })).status).toBe(200)
    const off = await api(`/api/users/${created.body.id}`, { method: 'PATCH', token: owner, body: { active: false } })
    expect(off.status).toBe(200)
    expect(off.body.active).toBe(false)
    expect((await api('/api/today', { token: login.body.token })).status).toBe(401)
    expect((await api('/api/auth/login', { method: 'POST', body: { email, password } })).status).toBe(401)
    await api(`/api/users/${created.body.id}`, { method: 'PATCH', token: owner, body: { active: true } })
    expect((await api('/api/auth/login', { method: 'POST', body: { email, password } })).status).toBe(200)
  })

  it('a password change ends the old sessions', async () => {
    const owner = await tokenFor(demo.owner)
    const email = uniqueEmail('password')
    const created = await api('/api/users', { method: 'POST', token: owner, body: { email, name: 'Pass Word', role: 'technician', password: 'first-long-password' } })
    const login = await api('/api/auth/login', { method: 'POST', body: { email, password: 'first-long-password' } })
    await api(`/api/users/${created.body.id}`, { method: 'PATCH', token: owner, body: { password: 'second-long-password' } })
    expect((await api('/api/auth/session', { token: login.body.token })).status).toBe(401)
    expect((await api('/api/auth/login', { method: 'POST', body: { email, password: 'second-long-password' } })).status).toBe(200)
  })

  it('a role change is audited and ends the old sessions', async () => {
    const owner = await tokenFor(demo.owner)
    const email = uniqueEmail('promote')
    const created = await api('/api/users', { method: 'POST', token: owner, body: { email, name: 'Role Change', role: 'technician', password: 'role-long-password' } })
    const login = await api('/api/auth/login', { method: 'POST', body: { email, password: 'role-long-password' } })
    const changed = await api(`/api/users/${created.body.id}`, { method: 'PATCH', token: owner, body: { role: 'owner' } })
    expect(changed.body.role).toBe('owner')
    expect((await api('/api/auth/session', { token: login.body.token })).status).toBe(401)
    const audit = await api(`/api/audit?subjectId=${created.body.id}`, { token: owner })
    const entry = audit.body.rows.find((r: { action: string }) => r.action === 'user.role_changed')
    expect(entry.detail).toEqual({ from: 'technician', to: 'owner' })
  })
})
