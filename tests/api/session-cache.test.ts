import { createHash } from 'node:crypto'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { api, demo, DEMO_PASSWORD } from '../helpers/api'

// The server keeps session lookups a few seconds in memory (server/utils/session-cache.ts); every
// change that ends a session sends a NOTIFY that each instance's listening connection acts on.
let pool: pg.Pool
beforeAll(() => { pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 }) })
afterAll(async () => { await pool.end() })

async function signIn(email: string) {
  const r = await api('/api/auth/login', { method: 'POST', body: { email, password: DEMO_PASSWORD } })
  expect(r.status).toBe(200)
  const tokenHash = createHash('sha256').update(r.body.token).digest('hex')
  const { rows: [s] } = await pool.query<{ id: string }>('select id from sessions where token_hash = $1', [tokenHash])
  return { token: r.body.token as string, sessionId: s!.id }
}

/** Polls until `status` answers `want` (the listener acts a moment after the commit), at most ~3 s. */
async function eventually(token: string, want: number) {
  let last = 0
  for (let i = 0; i < 30; i++) {
    last = (await api('/api/auth/session', { token })).status
    if (last === want) return last
    await new Promise(r => setTimeout(r, 100))
  }
  return last
}

describe('session cache', () => {
  it('serves a looked-up session from memory, and a NOTIFY sent from another connection evicts it', async () => {
    const { token, sessionId } = await signIn(demo.priya)
    // Looked up once (the listener is up by then), then from memory.
    expect(await eventually(token, 200)).toBe(200)
    await new Promise(r => setTimeout(r, 300))
    expect((await api('/api/auth/session', { token })).status).toBe(200)
    // Revoked behind the app's back, without a notification: the cached entry still answers,
    // which shows the cache is in use (and why every real change sends a NOTIFY).
    await pool.query('update sessions set revoked_at = now() where id = $1', [sessionId])
    expect((await api('/api/auth/session', { token })).status).toBe(200)
    // What another instance's sign-out sends, from a connection that is not the app's.
    await pool.query('select pg_notify($1, $2)', ['rillbook_sessions', `session:${sessionId}`])
    expect(await eventually(token, 401)).toBe(401)
  })

  it('a user-wide NOTIFY (deactivation, password or role change elsewhere) evicts every session of that user', async () => {
    const a = await signIn(demo.dario)
    const b = await signIn(demo.dario)
    expect(await eventually(a.token, 200)).toBe(200)
    expect(await eventually(b.token, 200)).toBe(200)
    await new Promise(r => setTimeout(r, 300))
    await api('/api/auth/session', { token: a.token })
    await api('/api/auth/session', { token: b.token })
    await pool.query('update sessions set revoked_at = now() where id = any($1::uuid[])', [[a.sessionId, b.sessionId]])
    const { rows: [u] } = await pool.query<{ id: string }>('select user_id as id from sessions where id = $1', [a.sessionId])
    await pool.query('select pg_notify($1, $2)', ['rillbook_sessions', `user:${u!.id}`])
    expect(await eventually(a.token, 401)).toBe(401)
    expect(await eventually(b.token, 401)).toBe(401)
  })

  it('sign-out ends the session at once for the next request, even while it is cached', async () => {
    const { token } = await signIn(demo.priya)
    expect(await eventually(token, 200)).toBe(200)
    await new Promise(r => setTimeout(r, 300))
    expect((await api('/api/auth/session', { token })).status).toBe(200)
    expect((await api('/api/auth/logout', { method: 'POST', token })).status).toBe(200)
    expect((await api('/api/auth/session', { token })).status).toBe(401)
  })
})
