import { randomUUID } from 'node:crypto'
import { mkdirSync, rmSync, writeFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'
import { caughtMail, catcherRunning, outboxMessageId, startCatcher, stopCatcher, waitForMail } from '../helpers/mail'

// The service is called directly only where no route exists: queueing with a given dedupe key
// and with inline images. Everything else goes over HTTP to the built server.
process.env.DATABASE_URL = inject('databaseUrl')
const { enqueueMail } = await import('../../server/services/mail')
const { closeDb, useDb } = await import('../../server/utils/db')

const root = resolve(import.meta.dirname, '../..')
const sleep = (ms: number) => new Promise(r => setTimeout(r, ms))

let owner = ''
let companyId = ''

beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  const company = await api('/api/company', { token: owner })
  companyId = company.body.id
})

afterAll(async () => {
  // Whatever happened, leave a catcher running for the tests that follow.
  if (!(await catcherRunning())) await startCatcher()
  await closeDb()
})

async function outboxRow(id: string) {
  const r = await api(`/api/outbox?pageSize=100`, { token: owner })
  expect(r.status).toBe(200)
  return (r.body.rows as any[]).find(row => row.id === id)
}

function copiesOf(outboxId: string) {
  return caughtMail().filter(m => m.messageId === outboxMessageId(outboxId)).length
}

describe('mail through the outbox', () => {
  it('the owner\'s test e-mail arrives in the catcher with HTML and text', async () => {
    const r = await api('/api/dev/mail/test', { method: 'POST', token: owner })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    const { outboxId } = r.body
    expect(outboxId).toMatch(/^[0-9a-f-]{36}$/)

    const msg = await waitForMail(m => m.messageId === outboxMessageId(outboxId))
    expect(msg.to).toEqual([demo.owner])
    expect(msg.from).toMatch(/no-reply@rillbook\.example/)
    expect(msg.subject).toBe('Rillbook test e-mail')
    expect(msg.html).toMatch(/<strong>Heronmere Water Gardens<\/strong>/)
    expect(msg.text).toMatch(/test e-mail from Rillbook for Heronmere Water Gardens/)

    const row = await outboxRow(outboxId)
    expect(row).toMatchObject({ status: 'sent', attempts: 1, lastError: null, messageId: outboxMessageId(outboxId), to: [demo.owner] })
    expect(row.sentAt).toBeTruthy()
    expect(row).not.toHaveProperty('html')

    // The dev mailbox lists it (newest first, no bodies) and shows it with both bodies.
    const list = await api('/api/dev/mail?pageSize=100', { token: owner })
    expect(list.status).toBe(200)
    const listed = (list.body.rows as any[]).find(m => m.messageId === outboxMessageId(outboxId))
    expect(listed).toMatchObject({ subject: 'Rillbook test e-mail', to: [demo.owner] })
    expect(listed).not.toHaveProperty('html')
    const times = (list.body.rows as any[]).map(m => m.receivedAt)
    expect(times).toEqual([...times].sort().reverse())
    const one = await api(`/api/dev/mail/${listed.id}`, { token: owner })
    expect(one.status).toBe(200)
    expect(one.body.html).toMatch(/Mail works/)
    expect(one.body.text).toMatch(/Mail works/)
  })

  it('the dev mailbox refuses ids that are not plain file names', async () => {
    for (const id of ['..%2F..%2Fpackage', 'catcher.pid', '..%2Fcatcher']) {
      const r = await api(`/api/dev/mail/${id}`, { token: owner })
      expect(r.status, id).toBe(400)
    }
    expect((await api(`/api/dev/mail/${randomUUID()}`, { token: owner })).status).toBe(404)
  })

  it('queues a dedupe key once and sends each queued message exactly once', async () => {
    const key = `test-dedupe:${randomUUID()}`
    const m = { companyId, dedupeKey: key, to: [demo.owner], subject: `Once only ${key}`, html: '<p>Once.</p>', text: 'Once.' }
    const first = await enqueueMail(useDb(), m)
    const second = await enqueueMail(useDb(), { ...m, subject: 'A second copy' })
    expect(first).toMatch(/^[0-9a-f-]{36}$/)
    expect(second).toBeNull()
    expect(await enqueueMail(useDb(), { ...m, dedupeKey: `${key}:nobody`, to: [' '] })).toBeNull()

    // Two test e-mails: two rows, two keys; then flush twice more.
    const a = await api('/api/dev/mail/test', { method: 'POST', token: owner })
    const b = await api('/api/dev/mail/test', { method: 'POST', token: owner })
    expect(a.body.outboxId).not.toBe(b.body.outboxId)
    for (let i = 0; i < 2; i++) expect((await api('/api/outbox/flush', { method: 'POST', token: owner, body: {} })).status).toBe(200)

    const ids = [first!, a.body.outboxId, b.body.outboxId]
    for (const id of ids) await waitForMail(msg => msg.messageId === outboxMessageId(id))
    await sleep(500)
    for (const id of ids) {
      expect(copiesOf(id), `copies of ${id}`).toBe(1)
      expect((await outboxRow(id))?.status).toBe('sent')
    }
    const rows = (await api('/api/outbox?pageSize=100', { token: owner })).body.rows as any[]
    expect(rows.filter(r => r.dedupeKey === key)).toHaveLength(1)
    expect(caughtMail().filter(c => c.subject === m.subject)).toHaveLength(1)
    expect(caughtMail().filter(c => c.subject === 'A second copy')).toHaveLength(0)
  })

  it('sends inline images by cid and leaves out an image that is missing from uploads', async () => {
    const uploads = resolve(root, '.data/uploads-test') // the test server's RILLBOOK_UPLOADS_DIR (tests/setup/server.ts)
    const name = `${randomUUID()}.png`
    const bytes = Buffer.from('89504e470d0a1a0a0000000d49484452', 'hex')
    mkdirSync(resolve(uploads, 'test-mail'), { recursive: true })
    writeFileSync(resolve(uploads, 'test-mail', name), bytes)
    try {
      const id = await enqueueMail(useDb(), {
        companyId,
        dedupeKey: `test-inline:${randomUUID()}`,
        to: [demo.owner],
        subject: 'Inline image check',
        html: '<p>Pond now: <img src="cid:pond-now" alt=""> and before: <img src="cid:gone" alt=""></p>',
        text: 'Pond now and before.',
        attachments: [
          { cid: 'pond-now', filename: 'pond-now.png', contentType: 'image/png', storageKey: `test-mail/${name}` },
          { cid: 'gone', filename: 'gone.png', contentType: 'image/png', storageKey: `test-mail/missing-${name}` },
        ],
      })
      expect((await api('/api/outbox/flush', { method: 'POST', token: owner, body: {} })).status).toBe(200)
      const msg = await waitForMail(m => m.messageId === outboxMessageId(id!))
      expect(msg.attachments.map(a => a.cid)).toEqual(['pond-now'])
      expect(msg.attachments[0]).toMatchObject({ filename: 'pond-now.png', contentType: 'image/png', size: bytes.length })
      expect(Buffer.from(msg.attachments[0]!.content, 'base64').equals(bytes)).toBe(true)
    }
    finally {
      rmSync(resolve(uploads, 'test-mail', name), { force: true })
    }
  })

  it('keeps a message pending while the SMTP server is down and sends it once after a retry', async () => {
    await stopCatcher()
    let outboxId: string
    try {
      const r = await api('/api/dev/mail/test', { method: 'POST', token: owner })
      expect(r.status, JSON.stringify(r.body)).toBe(200)
      outboxId = r.body.outboxId
      const row = await outboxRow(outboxId)
      expect(row.status).toBe('pending')
      expect(row.attempts).toBeGreaterThanOrEqual(1)
      expect(row.lastError).toMatch(/ECONNREFUSED|connect/i)
      expect(new Date(row.nextAttemptAt).getTime()).toBeGreaterThan(Date.now())
      const pendingOnly = await api('/api/outbox?status=pending&pageSize=100', { token: owner })
      expect((pendingOnly.body.rows as any[]).every(x => x.status === 'pending')).toBe(true)
      expect((pendingOnly.body.rows as any[]).some(x => x.id === outboxId)).toBe(true)
    }
    finally {
      await startCatcher()
    }

    const flushed = await api('/api/outbox/flush', { method: 'POST', token: owner, body: { retryNow: true } })
    expect(flushed.status).toBe(200)
    expect(flushed.body).toEqual({ sent: expect.any(Number), failed: expect.any(Number), pending: expect.any(Number) })
    await waitForMail(m => m.messageId === outboxMessageId(outboxId))
    // Another retry must not send it again.
    await api('/api/outbox/flush', { method: 'POST', token: owner, body: { retryNow: true } })
    await sleep(500)
    expect(copiesOf(outboxId)).toBe(1)
    const row = await outboxRow(outboxId)
    expect(row).toMatchObject({ status: 'sent', lastError: null })
    expect(row.attempts).toBeGreaterThanOrEqual(2)
  })

  it('rejects bad input', async () => {
    const r = await api('/api/outbox/flush', { method: 'POST', token: owner, body: { retryNow: 'yes' } })
    expect(r.status).toBe(400)
    expect(r.body.data.fields).toHaveProperty('retryNow')
    expect((await api('/api/outbox?status=lost', { token: owner })).status).toBe(400)
  })
})

describe('mail routes are for the owner only', () => {
  const routes: Array<[string, string]> = [
    ['GET', '/api/outbox'],
    ['POST', '/api/outbox/flush'],
    ['GET', '/api/dev/mail'],
    ['GET', `/api/dev/mail/${randomUUID()}`],
    ['POST', '/api/dev/mail/test'],
  ]
  for (const [method, path] of routes) {
    it(`${method} ${path.replace(/[0-9a-f-]{36}$/, ':id')}: 401 anonymous, 403 technician and customer`, async () => {
      const body = method === 'POST' ? {} : undefined
      const anon = await api(path, { method, body })
      expect(anon.status).toBe(401)
      for (const who of [demo.tess, demo.priya]) {
        const r = await api(path, { method, body, token: await tokenFor(who) })
        expect(r.status, `${who} on ${method} ${path}`).toBe(403)
      }
    })
  }
})
