import { randomUUID } from 'node:crypto'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { claimScheduleSlot } from '../../server/utils/schedule-slot'
import { api, demo, DEMO_PASSWORD, tokenFor, uniqueEmail } from '../helpers/api'
import { caughtMail, outboxMessageId, waitForMail } from '../helpers/mail'
import { s3Files, startInstance, startS3, stopInstance, testClient, waitForLockWaiters, type Instance } from '../helpers/instances'
import { visitForTessToday } from '../helpers/visits'

// Two app instances (two processes of the same build on two ports) against one PostgreSQL and
// one S3-compatible bucket: whatever one of them does, the other sees, and work that must happen
// once happens once.

let s3: Awaited<ReturnType<typeof startS3>>
let a: Instance
let b: Instance
beforeAll(async () => {
  s3 = await startS3()
  ;[a, b] = await Promise.all([startInstance('a', 1, s3.endpoint), startInstance('b', 2, s3.endpoint)])
}, 120_000)
afterAll(async () => {
  await Promise.all([stopInstance(a), stopInstance(b)])
  await s3?.close()
})

const on = (inst: Instance, path: string, opts: Parameters<typeof api>[1] = {}) => api(path, { ...opts, base: inst.baseUrl })

/**
 * Both instances start the same job at once while the test holds `table` locked, so whichever
 * takes the job's lock first waits inside the job and the other must find the job taken. When an
 * outside run (a schedule of the test server) holds the job's lock, both skip: try again.
 */
async function raceOnce<T extends { skipped?: boolean }>(table: string, job: (inst: Instance) => Promise<T>) {
  for (let attempt = 0; attempt < 3; attempt++) {
    const client = await testClient()
    try {
      await client.query('begin')
      await client.query(`lock table ${table} in exclusive mode`)
      const runs = [a, b].map(inst => job(inst).then(value => ({ inst, value })))
      const first = await Promise.race(runs)
      // The first answer comes while the winner still waits behind the table lock.
      const winnerWaits = await waitForLockWaiters(client, [a.appName, b.appName], 1)
      await client.query('commit')
      const both = await Promise.all(runs)
      if (both.every(r => r.value.skipped)) continue
      return { first, winnerWaits, both }
    }
    finally {
      await client.end()
    }
  }
  throw new Error(`both instances skipped ${table}'s job three times: something else keeps running it`)
}

describe('two instances, one database, one bucket', () => {
  it('a session made on one works on the other, and signing out on one ends it on both at once', async () => {
    const signedIn = await on(a, '/api/auth/login', { method: 'POST', body: { email: demo.dario, password: DEMO_PASSWORD } })
    expect(signedIn.status).toBe(200)
    const token = signedIn.body.token as string
    const onB = await on(b, '/api/auth/session', { token })
    expect(onB.status).toBe(200)
    expect(onB.body.email).toBe(demo.dario)
    // B has just looked the session up (any cache of it is warm); A ends it.
    expect((await on(b, '/api/today', { token })).status).toBe(200)
    expect((await on(a, '/api/auth/logout', { method: 'POST', token })).status).toBe(200)
    // No waiting: the very next request to B is refused.
    expect((await on(b, '/api/auth/session', { token })).status).toBe(401)
    expect((await on(b, '/api/today', { token })).status).toBe(401)
    expect((await on(a, '/api/auth/session', { token })).status).toBe(401)
  })

  it('a photo uploaded through one is served by the other, from the bucket', async () => {
    const tess = await tokenFor(demo.tess)
    const owner = await tokenFor(demo.owner)
    const v = await visitForTessToday('instances-photo')
    expect((await on(b, `/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })).status).toBe(200)
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 30, g: 110, b: 90 } } }).jpeg().toBuffer()
    const id = randomUUID()
    const form = new FormData()
    form.append('id', id)
    form.append('file', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'pond.jpg')
    const up = await fetch(`${a.baseUrl}/api/visits/${v.visitId}/photos`, { method: 'POST', body: form, headers: { authorization: `Bearer ${tess}` } })
    expect(up.status, await up.clone().text()).toBe(201)

    const fromB = await fetch(`${b.baseUrl}/api/photos/${id}`, { headers: { authorization: `Bearer ${owner}` } })
    expect(fromB.status).toBe(200)
    expect(fromB.headers.get('content-type')).toContain('image/jpeg')
    const fromA = await fetch(`${a.baseUrl}/api/photos/${id}`, { headers: { authorization: `Bearer ${owner}` } })
    expect(Buffer.from(await fromB.arrayBuffer()).equals(Buffer.from(await fromA.arrayBuffer()))).toBe(true)
    const thumb = await fetch(`${b.baseUrl}/api/photos/${id}?size=thumb`, { headers: { authorization: `Bearer ${owner}` } })
    expect(thumb.status).toBe(200)
    // The files are in the bucket, not in a folder of one machine: the test server, which keeps
    // photos in its own folder, has the row but not the file.
    expect(s3Files().filter(f => f.includes(id)).length).toBeGreaterThanOrEqual(2)
    expect((await api(`/api/photos/${id}`, { token: owner })).status).toBe(404)
  })

  it('the alert scan started on both at once runs on one; the other skips; its e-mail goes once', async () => {
    const owner = await tokenFor(demo.owner)
    const tess = await tokenFor(demo.tess)
    const v = await visitForTessToday('instances-scan')
    await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
    // Koi pond defaults (common practice, profiles.ts): total ammonia above 1.0 mg/L is at the act level.
    const reading = { id: randomUUID(), featureId: v.featureId, takenAt: new Date(Date.now() - 3600_000).toISOString(), ammoniaBasis: 'N', temperatureC: 15, pH: 7.2, totalAmmoniaMgL: 2.0 }
    const saved = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [reading] } })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)

    const { first, winnerWaits, both } = await raceOnce('task_watermarks', async inst => (await on(inst, '/api/alerts/scan', { method: 'POST', token: owner })).body as { skipped?: boolean, readingsScanned?: number })
    expect(first.value.skipped).toBe(true)
    expect(winnerWaits).toBe(true)
    const ran = both.filter(r => !r.value.skipped)
    expect(ran).toHaveLength(1)
    expect(ran[0]!.value.readingsScanned).toBeGreaterThanOrEqual(1)

    const alerts = (await api(`/api/alerts?featureId=${v.featureId}&status=active&pageSize=100`, { token: owner })).body.rows as Array<{ condition: string }>
    expect(alerts.filter(x => x.condition === 'reading.totalAmmoniaMgL')).toHaveLength(1)
    // Both instances flush the outbox (after the scan and each minute): the customer hears once.
    await Promise.all([a, b].map(inst => on(inst, '/api/outbox/flush', { method: 'POST', token: owner, body: {} })))
    await waitForMail(m => m.to.includes(v.reportTo))
    await new Promise(r => setTimeout(r, 1000))
    expect(caughtMail().filter(m => m.to.includes(v.reportTo))).toHaveLength(1)
  })

  it('the billing run started on both at once runs on one and the other skips', async () => {
    const owner = await tokenFor(demo.owner)
    const client = await testClient()
    const count = async () => (await client.query<{ n: number }>(`select count(*)::int as n from task_runs where name = 'billing:renew'`)).rows[0]!.n
    try {
      const before = await count()
      const { first, winnerWaits, both } = await raceOnce('task_runs', async inst => (await on(inst, '/api/billing/run', { method: 'POST', token: owner })).body as { skipped?: boolean, runId?: string })
      expect(first.value.skipped).toBe(true)
      expect(winnerWaits).toBe(true)
      const ran = both.filter(r => !r.value.skipped)
      expect(ran).toHaveLength(1)
      expect(ran[0]!.value.runId).toEqual(expect.any(String))
      expect(await count()).toBe(before + 1)
    }
    finally {
      await client.end()
    }
  })

  it('both flushing the outbox at the same moment send each waiting e-mail once', async () => {
    const owner = await tokenFor(demo.owner)
    const causes = Array.from({ length: 8 }, (_, i) => ({ id: randomUUID(), to: uniqueEmail(`instances-flush-${i}`) }))
    const client = await testClient()
    let flushed: Array<{ status: number, body: { sent: number } }>
    try {
      // Queued and locked in one transaction: both flushes wait on the outbox, then go together.
      await client.query('begin')
      await client.query('lock table outbox in exclusive mode')
      for (const c of causes) {
        await client.query(`insert into outbox (id, dedupe_key, "to", subject, html, text) values ($1, $2, $3, $4, $5, $6)`,
          [c.id, `test:instances:${c.id}`, [c.to], 'Two instances, one message', '<p>Once</p>', 'Once'])
      }
      const flushes = [a, b].map(inst => on(inst, '/api/outbox/flush', { method: 'POST', token: owner, body: {} }))
      expect(await waitForLockWaiters(client, [a.appName, b.appName], 2)).toBe(true)
      await client.query('commit')
      flushed = await Promise.all(flushes)
    }
    finally {
      await client.end()
    }
    for (const f of flushed) expect(f.status).toBe(200)
    for (const c of causes) await waitForMail(m => m.to.includes(c.to))
    await new Promise(r => setTimeout(r, 1000))
    for (const c of causes) {
      const got = caughtMail().filter(m => m.to.includes(c.to))
      expect(got, c.to).toHaveLength(1)
      expect(got[0]!.messageId).toBe(outboxMessageId(c.id))
    }
    // Each one went out through one of the two (the schedules of the three servers may take some too).
    expect(flushed.reduce((s, f) => s + f.body.sent, 0)).toBeLessThanOrEqual(causes.length)
  })

  it('a scheduled firing is claimed by exactly one of the workers that fire it', async () => {
    const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 6 })
    try {
      // Six workers, each with its own connection, fire the ten-minute schedule at 09:00 UTC.
      const workers = Array.from({ length: 6 }, () => drizzle(pool))
      const name = `test:${randomUUID()}`
      const tenMinutes = 10 * 60_000
      const at = (iso: string) => new Date(iso)
      const claims = await Promise.all(workers.map((db, i) => claimScheduleSlot(db, name, tenMinutes, at(`2026-06-01T09:00:0${i}.000Z`))))
      expect(claims.filter(Boolean)).toHaveLength(1)
      // A worker late by minutes within the same period finds the firing taken.
      expect(await claimScheduleSlot(workers[0]!, name, tenMinutes, at('2026-06-01T09:07:30.000Z'))).toBe(false)
      // The next firing is free again, and so is an earlier one after the clock was set back.
      expect(await claimScheduleSlot(workers[1]!, name, tenMinutes, at('2026-06-01T09:10:00.000Z'))).toBe(true)
      expect(await claimScheduleSlot(workers[2]!, name, tenMinutes, at('2026-03-01T09:00:00.000Z'))).toBe(true)
    }
    finally {
      await pool.end()
    }
  })
})
