import { describe, expect, it } from 'vitest'
import { api, demo, tokenFor, uniqueEmail } from '../helpers/api'

describe('the owner manages sign-ins', () => {
  it('creates a customer login linked to a customer; the new user lands in their own portal', async () => {
    const owner = await tokenFor(demo.owner)
    const customers = await api('/api/customers?q=Rookwood', { token: owner })
    const customer = customers.body.rows[0]
    expect(customer.name).toBe('Silas Rookwood')
    const email = uniqueEmail('rookwood')
    const created = await api('/api/users', { method: 'POST', token: owner, body: { email, name: 'Silas (second login)', role: 'customer', customerId: customer.id, password: 'rookwood-pond-pw' } })
    expect(created.status).toBe(201)
    expect(created.body).not.toHaveProperty('passwordHash')
    const token = await tokenFor(email, 'rookwood-pond-pw')
    const me = await api('/api/customers', { token })
    expect(me.body.rows.map((r: { id: string }) => r.id)).toEqual([customer.id])
  })

  it('names the field when input is bad, and writes nothing', async () => {
    const owner = await tokenFor(demo.owner)
    const email = uniqueEmail('bad')
    const r = await api('/api/users', { method: 'POST', token: owner, body: { email, name: '', role: 'wizard', password: 'short' } })
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields).sort()).toEqual(['name', 'password', 'role'])
    const list = await api(`/api/users?q=${encodeURIComponent(email)}`, { token: owner })
    expect(list.body.total).toBe(0)
  })

  it('refuses a duplicate e-mail with 409 naming the field', async () => {
    const owner = await tokenFor(demo.owner)
    const r = await api('/api/users', { method: 'POST', token: owner, body: { email: demo.tess, name: 'Tess again', role: 'technician', password: 'long-enough-pw' } })
    expect(r.status).toBe(409)
    expect(r.body.data.fields.email).toBeTruthy()
  })

  it('will not let the owner deactivate themself', async () => {
    const owner = await tokenFor(demo.owner)
    const me = await api('/api/auth/session', { token: owner })
    const r = await api(`/api/users/${me.body.id}`, { method: 'PATCH', token: owner, body: { active: false } })
    expect(r.status).toBe(400)
  })

  it('pages the list and caps the page size', async () => {
    const owner = await tokenFor(demo.owner)
    const r = await api('/api/users?pageSize=5&page=2', { token: owner })
    expect(r.body.rows).toHaveLength(5)
    expect(r.body.total).toBeGreaterThan(30)
    expect((await api('/api/users?pageSize=5000', { token: owner })).status).toBe(400)
  })

  it('a user of another company is out of reach (404)', async () => {
    const owner = await tokenFor(demo.owner)
    const r = await api('/api/users/00000000-0000-4000-8000-000000000000', { method: 'PATCH', token: owner, body: { name: 'X' } })
    expect(r.status).toBe(404)
  })

  it('changes company settings and rejects a bad time zone naming the field', async () => {
    const owner = await tokenFor(demo.owner)
    const bad = await api('/api/company', { method: 'PATCH', token: owner, body: { timeZone: 'Nowhere/Larchfield' } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.timeZone).toBeTruthy()
    const ok = await api('/api/company', { method: 'PATCH', token: owner, body: { taxRateBasisPoints: 725 } })
    expect(ok.status).toBe(200)
    expect(ok.body.taxRateBasisPoints).toBe(725)
  })
})
