import { describe, expect, it } from 'vitest'
import { baseUrl, DEMO_PASSWORD, demo } from '../helpers/api'

// The browser's session travels in a cookie the server sets (HttpOnly, SameSite=Lax, Secure over
// HTTPS) and clears; scripts keep `Authorization: Bearer`.
const address = `10.13.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`
const origin = () => new URL(baseUrl()).origin
const sameSite = () => ({ 'origin': origin(), 'sec-fetch-site': 'same-origin' })

async function login(headers: Record<string, string> = {}) {
  const res = await fetch(`${baseUrl()}/api/auth/login`, {
    method: 'POST', headers: { 'content-type': 'application/json', 'x-forwarded-for': address, ...headers },
    body: JSON.stringify({ email: demo.owner, password: DEMO_PASSWORD }),
  })
  expect(res.status).toBe(200)
  const cookie = res.headers.getSetCookie().find(c => c.startsWith('auth.token='))
  return { body: await res.json() as { token?: string, session?: string, user: { email: string } }, cookie: cookie ?? '' }
}
const valueOf = (setCookie: string) => setCookie.split(';')[0]!.slice('auth.token='.length)
const attributes = (setCookie: string) => setCookie.split(';').slice(1).map(a => a.trim().toLowerCase())
const session = (headers: Record<string, string>) => fetch(`${baseUrl()}/api/auth/session`, { headers })

describe('the session cookie', () => {
  it('is set by the server at sign-in: HttpOnly, SameSite=Lax, the whole path, for the session\'s lifetime', async () => {
    const { body, cookie } = await login()
    expect(body.token).toBeTruthy()
    expect(valueOf(cookie)).toBe(body.token)
    const attrs = attributes(cookie)
    expect(attrs).toContain('httponly')
    expect(attrs).toContain('samesite=lax')
    expect(attrs).toContain('path=/')
    expect(attrs).toContain(`max-age=${12 * 3600}`)
    // Plain HTTP here: no Secure flag, or the browser would drop the cookie.
    expect(attrs).not.toContain('secure')
    // Scripts keep signing in with the token as a Bearer header, and get no cookie back for it.
    const me = await session({ authorization: `Bearer ${body.token}` })
    expect(me.status).toBe(200)
    expect(me.headers.getSetCookie().some(c => c.startsWith('auth.token='))).toBe(false)
    expect((await fetch(`${baseUrl()}/api/auth/logout`, { method: 'POST', headers: { authorization: `Bearer ${body.token}` } })).status).toBe(200)
    expect((await session({ authorization: `Bearer ${body.token}` })).status).toBe(401)
  })

  it('gets the Secure flag when the (trusted) proxy says the request came over HTTPS', async () => {
    const { cookie } = await login({ 'x-forwarded-proto': 'https' })
    expect(attributes(cookie)).toContain('secure')
    expect(attributes(cookie)).toContain('httponly')
  })

  it('alone signs a request in; the sign-in form gets no token in the answer', async () => {
    const { body, cookie } = await login({ 'x-rillbook-session': 'cookie' })
    expect(body).not.toHaveProperty('token')
    expect(body.session).toBe('cookie')
    expect(body.user.email).toBe(demo.owner)
    const token = valueOf(cookie)
    expect(token.length).toBeGreaterThan(30)
    const me = await session({ cookie: `auth.token=${token}` })
    expect(me.status).toBe(200)
    expect((await me.json()).email).toBe(demo.owner)
    // nuxt-auth's marker header is not a credential.
    expect((await session({ 'x-rillbook-session': 'cookie' })).status).toBe(401)
  })

  it('is not used when the request carries its own Authorization header (which skips the CSRF check)', async () => {
    const { body } = await login()
    const jar = `auth.token=${body.token}`
    for (const authorization of ['Basic Zm9vOmJhcg==', 'Bearer not-a-session', 'Bearer ']) {
      expect((await session({ cookie: jar, authorization })).status, authorization).toBe(401)
      const forged = await fetch(`${baseUrl()}/api/customers`, {
        method: 'POST', headers: { 'content-type': 'application/json', 'cookie': jar, authorization, 'origin': 'https://attacker.example', 'sec-fetch-site': 'cross-site' },
        body: JSON.stringify({ name: 'Forged With Header', kind: 'household' }),
      })
      expect(forged.status, authorization).toBe(401)
    }
  })

  it('is cleared at sign-out, which a page on another site cannot trigger; the ended session\'s cookie is refused and cleared', async () => {
    const { cookie } = await login({ 'x-rillbook-session': 'cookie' })
    const jar = `auth.token=${valueOf(cookie)}`
    const forged = await fetch(`${baseUrl()}/api/auth/logout`, { method: 'POST', headers: { 'cookie': jar, 'origin': 'https://attacker.example', 'sec-fetch-site': 'cross-site' } })
    expect(forged.status).toBe(403)
    expect((await session({ cookie: jar })).status).toBe(200)
    const out = await fetch(`${baseUrl()}/api/auth/logout`, { method: 'POST', headers: { cookie: jar, ...sameSite() } })
    expect(out.status).toBe(200)
    const cleared = out.headers.getSetCookie().find(c => c.startsWith('auth.token='))!
    expect(valueOf(cleared)).toBe('')
    expect(attributes(cleared)).toContain('max-age=0')
    expect(attributes(cleared)).toContain('httponly')
    const after = await session({ cookie: jar })
    expect(after.status).toBe(401)
    expect(valueOf(after.headers.getSetCookie().find(c => c.startsWith('auth.token='))!)).toBe('')
  })
})
