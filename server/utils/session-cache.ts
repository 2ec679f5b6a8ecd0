import pg from 'pg'
import { sql } from 'drizzle-orm'
import type { SessionUser } from './auth'
import { databaseUrl, type Database, type Tx } from './db'

/**
 * A short in-process cache of session lookups (token hash → signed-in user), so a request does not
 * read the sessions and users tables every time. Every instance clears it through PostgreSQL
 * LISTEN/NOTIFY: whatever ends a session or changes a user sends `notifySessionsChanged` in the
 * same transaction, and each process's one listening connection evicts the entries it names once
 * that transaction commits. While that connection is down the cache is empty and not used (a
 * notification might have been missed), so a lost connection can never keep a session alive.
 *
 * RILLBOOK_SESSION_CACHE_MS sets how long an entry lives (default 30 s; 0 turns the cache off).
 */
export const SESSIONS_CHANNEL = 'rillbook_sessions'

interface Entry { user: SessionUser, expiresAt: number, cachedAt: number }

const entries = new Map<string, Entry>()
/** Bumped by every eviction: a lookup that started before one is not stored (it may have read the old row). */
let generation = 0
let listener: pg.Client | null = null
let listening = false
let connecting = false
let retryMs = 250

function ttlMs() {
  const v = Number(process.env.RILLBOOK_SESSION_CACHE_MS ?? 30_000)
  return Number.isFinite(v) && v > 0 ? v : 0
}

/**
 * What a notification names: one session (sign-out), every session of one user (deactivation,
 * password, role, name or units), or of one company (its settings travel with each session).
 */
export type SessionChange = { sessionId: string } | { userId: string } | { companyId: string }

function encode(change: SessionChange) {
  if ('sessionId' in change) return `session:${change.sessionId}`
  return 'userId' in change ? `user:${change.userId}` : `company:${change.companyId}`
}

function names(change: SessionChange, user: SessionUser) {
  if ('sessionId' in change) return user.sessionId === change.sessionId
  return 'userId' in change ? user.id === change.userId : user.companyId === change.companyId
}

/** Drops the entries a change names, in this process only. */
export function evictLocal(change: SessionChange) {
  generation++
  for (const [hash, e] of entries) {
    if (names(change, e.user)) entries.delete(hash)
  }
}

function evictPayload(payload: string | undefined) {
  const [kind, id] = (payload ?? '').split(':')
  if (kind === 'session' && id) evictLocal({ sessionId: id })
  else if (kind === 'user' && id) evictLocal({ userId: id })
  else if (kind === 'company' && id) evictLocal({ companyId: id })
  else clearSessionCache()
}

export function clearSessionCache() {
  generation++
  entries.clear()
}

/**
 * Sends the change to every instance, inside `tx` so it is delivered only if the change commits.
 * This process also drops its own entries at once (the caller's next request must not wait for
 * the notification to come back).
 */
export async function notifySessionsChanged(tx: Tx | Database, change: SessionChange) {
  await tx.execute(sql`select pg_notify(${SESSIONS_CHANNEL}, ${encode(change)})`)
  evictLocal(change)
}

/** Opens the listening connection (once per process); on loss it clears the cache and reconnects. */
function ensureListener() {
  if (listener || connecting || !ttlMs()) return
  connecting = true
  const client = new pg.Client({ connectionString: databaseUrl() })
  const lost = () => {
    if (listener !== client) return
    listener = null
    listening = false
    clearSessionCache()
    client.end().catch(() => {})
    setTimeout(ensureListener, retryMs).unref()
    retryMs = Math.min(retryMs * 2, 10_000)
  }
  client.on('error', lost)
  client.on('end', lost)
  client.on('notification', msg => evictPayload(msg.payload))
  listener = client
  client.connect()
    .then(() => client.query(`LISTEN ${SESSIONS_CHANNEL}`))
    .then(() => {
      if (listener !== client) return
      // Anything cached before this moment could have missed a notification.
      clearSessionCache()
      listening = true
      retryMs = 250
    })
    .catch(() => lost())
    .finally(() => { connecting = false })
}

/** True when the cache may be used: it is on and this process is listening for evictions. */
function active() {
  if (!ttlMs()) return false
  ensureListener()
  return listening
}

export function cachedSession(tokenHash: string, now = Date.now()): SessionUser | undefined {
  if (!active()) return undefined
  const e = entries.get(tokenHash)
  if (!e) return undefined
  if (now >= e.expiresAt || now - e.cachedAt >= ttlMs()) {
    entries.delete(tokenHash)
    return undefined
  }
  // A copy: a request that changes its user object cannot change the next request's.
  return { ...e.user }
}

/** Marks the start of a lookup; pass the mark to `storeSession` with what the lookup found. */
export function lookupMark() {
  return generation
}

export function storeSession(tokenHash: string, user: SessionUser, sessionExpiresAt: Date, mark: number, now = Date.now()) {
  if (!active() || mark !== generation) return
  // Bounded: a flood of distinct valid tokens cannot grow the map without limit.
  if (entries.size >= 10_000) entries.clear()
  entries.set(tokenHash, { user, expiresAt: sessionExpiresAt.getTime(), cachedAt: now })
}

/** For tests and shutdown: closes the listening connection. */
export async function stopSessionListener() {
  const client = listener
  listener = null
  listening = false
  clearSessionCache()
  await client?.end().catch(() => {})
}
