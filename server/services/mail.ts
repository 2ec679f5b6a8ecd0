import { escapeHtml } from '../utils/html'
import { randomUUID } from 'node:crypto'
import { readdir, readFile } from 'node:fs/promises'
import { join } from 'node:path'
import { and, count, desc, eq, sql, type SQL } from 'drizzle-orm'
import { companies, outbox } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Database, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { mailFrom, sendMail } from '../utils/mailer'

export type OutboxStatus = 'pending' | 'sent' | 'failed'
export interface MailAttachment { cid: string, filename: string, contentType: string, storageKey: string }
export interface OutgoingMail {
  companyId: string | null
  /** Unique per message, e.g. `visit-report:<visitId>`: the same key is never queued twice. */
  dedupeKey: string
  to: string[]
  subject: string
  html: string
  text: string
  /** Inline images, referenced from the HTML as `cid:<cid>`; read from the uploads storage at send time. */
  attachments?: MailAttachment[]
}
export interface FlushResult {
  /** Claimed rows delivered in this run. */
  sent: number
  /** Claimed rows that failed for the last time in this run (status `failed`). */
  failed: number
  /** Claimed rows that failed in this run and will be tried again later. */
  pending: number
}

/** After this many attempts a message is `failed` (kept; `retryNow` tries it again). */
export const MAX_ATTEMPTS = 12
/** How long a claimed row is reserved for the worker sending it. */
const LEASE = sql`interval '5 minutes'`

/** Seconds to wait before the next try after `attempts` tries: 30 s × 2^(attempts−1), at most an hour. */
export function backoffSeconds(attempts: number) {
  return Math.min(3600, 30 * 2 ** Math.max(0, attempts - 1))
}

/**
 * Queues one message, inside the caller's transaction so it exists exactly when the change that
 * caused it commits. Returns the outbox id, or null when there is no recipient or a message
 * with the same `dedupeKey` is already queued (or sent).
 */
export async function enqueueMail(tx: Tx | Database, m: OutgoingMail): Promise<string | null> {
  return (await enqueueMails(tx, [m]))[0] ?? null
}

/** Messages per insert statement (7 parameters each, well under PostgreSQL's 65,535). */
const MAILS_PER_STATEMENT = 5000

/**
 * Queues many messages (a batch job) with one insert per few thousand: the same rules as
 * `enqueueMail`, and the outbox id (or null) of each message in the order given.
 */
export async function enqueueMails(tx: Tx | Database, messages: readonly OutgoingMail[]): Promise<Array<string | null>> {
  const rows = messages.map(m => ({ m, to: [...new Set(m.to.map(a => a.trim()).filter(Boolean))] }))
  const idOf = new Map<string, string>()
  const sendable = rows.filter(r => r.to.length)
  for (let i = 0; i < sendable.length; i += MAILS_PER_STATEMENT) {
    const made = await tx.insert(outbox).values(sendable.slice(i, i + MAILS_PER_STATEMENT).map(({ m, to }) => ({
      companyId: m.companyId,
      dedupeKey: m.dedupeKey,
      to,
      subject: m.subject,
      html: m.html,
      text: m.text,
      attachments: m.attachments ?? [],
    }))).onConflictDoNothing({ target: outbox.dedupeKey }).returning({ id: outbox.id, dedupeKey: outbox.dedupeKey })
    for (const r of made) idOf.set(r.dedupeKey, r.id)
  }
  return rows.map(r => (r.to.length ? idOf.get(r.m.dedupeKey) ?? null : null))
}

interface ClaimedRow extends Record<string, unknown> {
  id: string
  to: string[]
  subject: string
  html: string
  text: string
  attachments: MailAttachment[]
  attempts: number
}

async function inlineAttachments(list: MailAttachment[]) {
  const out = []
  for (const a of list) {
    try {
      const raw = await useStorage('uploads').getItemRaw(a.storageKey)
      if (raw == null) continue
      const content = Buffer.isBuffer(raw) ? raw : raw instanceof Uint8Array ? Buffer.from(raw) : Buffer.from(raw as ArrayBuffer)
      out.push({ cid: a.cid, filename: a.filename, contentType: a.contentType, content, contentDisposition: 'inline' as const })
    }
    catch {
      // A missing or unreadable upload: the message goes without that image.
    }
  }
  return out
}

function errorText(err: unknown) {
  const e = err as { message?: string, code?: string, responseCode?: number }
  const text = [e?.code, e?.responseCode, e?.message ?? String(err)].filter(Boolean).join(': ')
  return text.slice(0, 1000)
}

/**
 * Sends what is due. Rows are claimed in one statement (`FOR UPDATE SKIP LOCKED`, then a
 * five-minute lease on `next_attempt_at`), so several workers never send the same row; the
 * outbox id is the Message-ID, so a receiver can spot a repeat after a crash mid-send.
 * `retryNow` also takes rows waiting out a backoff and `failed` rows (back to pending), but
 * never a row another worker is sending right now. A send failure is recorded on the row, never thrown.
 */
export async function flushOutbox(opts: { limit?: number, retryNow?: boolean } = {}): Promise<FlushResult> {
  const db = useDb()
  const limit = Math.min(500, Math.max(1, Math.trunc(opts.limit ?? 50)))
  // A claimed row has a lease and no last_error (the claim clears it); a row waiting out a
  // backoff has a last_error. So retryNow can skip rows in flight.
  const due = opts.retryNow
    ? sql`(status = 'failed' OR (status = 'pending' AND (next_attempt_at <= now() OR last_error IS NOT NULL)))`
    : sql`(status = 'pending' AND next_attempt_at <= now())`
  const claimed = await db.execute<ClaimedRow>(sql`
    UPDATE outbox
       SET next_attempt_at = now() + ${LEASE}, attempts = attempts + 1, status = 'pending',
           last_error = NULL, updated_at = now()
     WHERE id IN (SELECT id FROM outbox WHERE ${due} ORDER BY created_at LIMIT ${limit} FOR UPDATE SKIP LOCKED)
     RETURNING id, "to", subject, html, text, attachments, attempts`)

  const result: FlushResult = { sent: 0, failed: 0, pending: 0 }
  for (const row of claimed.rows) {
    try {
      const info = await sendMail({
        from: mailFrom(),
        to: row.to,
        subject: row.subject,
        html: row.html,
        text: row.text,
        messageId: `<${row.id}@rillbook>`,
        attachments: await inlineAttachments(row.attachments ?? []),
      })
      await db.update(outbox).set({
        status: 'sent', sentAt: new Date(), messageId: info.messageId ?? `<${row.id}@rillbook>`, lastError: null, updatedAt: new Date(),
      }).where(eq(outbox.id, row.id))
      result.sent++
    }
    catch (err) {
      const gaveUp = row.attempts >= MAX_ATTEMPTS
      await db.update(outbox).set({
        status: gaveUp ? 'failed' : 'pending',
        lastError: errorText(err),
        nextAttemptAt: sql`now() + make_interval(secs => ${backoffSeconds(row.attempts)})`,
        updatedAt: new Date(),
      }).where(eq(outbox.id, row.id))
      if (gaveUp) result.failed++
      else result.pending++
    }
  }
  return result
}

/** The company's outbox, newest first, without the message bodies. */
export async function listOutbox(companyId: string, q: { page: number, pageSize: number, status?: OutboxStatus }) {
  const db = useDb()
  const where: SQL[] = [eq(outbox.companyId, companyId)]
  if (q.status) where.push(eq(outbox.status, q.status))
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select({
      id: outbox.id, dedupeKey: outbox.dedupeKey, to: outbox.to, subject: outbox.subject, status: outbox.status,
      attempts: outbox.attempts, nextAttemptAt: outbox.nextAttemptAt, lastError: outbox.lastError,
      sentAt: outbox.sentAt, messageId: outbox.messageId, createdAt: outbox.createdAt, updatedAt: outbox.updatedAt,
    }).from(outbox).where(cond).orderBy(desc(outbox.createdAt), desc(outbox.id))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(outbox).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

/** Queues a short test message to the signed-in user's own address and sends what is due. */
export async function sendTestMail(actor: SessionUser) {
  const db = useDb()
  const [company] = await db.select({ name: companies.name }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  const companyName = company?.name ?? 'your company'
  const sentAt = new Date().toISOString()
  const outboxId = await enqueueMail(db, {
    companyId: actor.companyId,
    dedupeKey: `test:${randomUUID()}`,
    to: [actor.email],
    subject: 'Rillbook test e-mail',
    html: `<!doctype html><html><body style="font-family:sans-serif;color:#1c1917">
<h1 style="font-size:20px;color:#0f5c57">Mail works</h1>
<p>Hello ${escapeHtml(actor.name)},</p>
<p>this is a test e-mail from Rillbook for <strong>${escapeHtml(companyName)}</strong>, queued at ${sentAt}.</p>
<p>Visit reports and alerts will arrive the same way.</p>
</body></html>`,
    text: `Mail works\n\nHello ${actor.name},\n\nthis is a test e-mail from Rillbook for ${companyName}, queued at ${sentAt}.\n\nVisit reports and alerts will arrive the same way.\n`,
  })
  if (!outboxId) throw httpError(409, 'The test e-mail could not be queued')
  await flushOutbox()
  return { outboxId }
}

// ---- The local mail catcher's mailbox (scripts/mail-catcher.mjs), for development ----

export interface CaughtMail {
  id: string
  receivedAt: string
  from: string
  to: string[]
  subject: string
  text: string
  html: string
  messageId: string | null
  attachments: Array<{ filename: string | null, contentType: string, cid: string | null, size: number, content?: string }>
}

const CAUGHT_FILE = /^([\w-]+)\.json$/

function mailDir() {
  const dir = process.env.RILLBOOK_MAIL_DIR
  if (!dir) throw httpError(404, 'The local mail catcher is not running')
  return dir
}

async function readCaught(dir: string, id: string): Promise<CaughtMail | null> {
  try {
    return JSON.parse(await readFile(join(dir, `${id}.json`), 'utf8')) as CaughtMail
  }
  catch {
    return null
  }
}

/** Messages the local catcher holds, newest first, without bodies or attachment bytes. */
export async function listCaughtMail(q: { page: number, pageSize: number }) {
  const dir = mailDir()
  let names: string[] = []
  try {
    names = await readdir(dir)
  }
  catch {}
  const ids = names.map(n => CAUGHT_FILE.exec(n)?.[1]).filter((id): id is string => !!id).sort().reverse()
  const rows = []
  for (const id of ids.slice((q.page - 1) * q.pageSize, q.page * q.pageSize)) {
    const m = await readCaught(dir, id)
    if (!m) continue
    rows.push({
      id: m.id, receivedAt: m.receivedAt, from: m.from, to: m.to, subject: m.subject, messageId: m.messageId,
      attachments: m.attachments.map(({ content: _content, ...a }) => a),
    })
  }
  return { rows, total: ids.length, page: q.page, pageSize: q.pageSize }
}

/** One caught message with its HTML and text (attachment bytes left out). `id` matches /^[\w-]+$/. */
export async function getCaughtMail(id: string) {
  const dir = mailDir()
  if (!/^[\w-]+$/.test(id)) throw httpError(400, 'Not a message id')
  const m = await readCaught(dir, id)
  if (!m) throw httpError(404, 'No caught message with that id')
  return { ...m, attachments: m.attachments.map(({ content: _content, ...a }) => a) }
}
