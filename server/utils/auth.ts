import { createHash, randomBytes } from 'node:crypto'
import { and, eq, gt, isNull } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { can, type Permission, type Role } from '../../shared/utils/roles'
import type { UnitSystem } from '../../shared/utils/water/format'
import { companies, sessions, users } from '../db/schema'
import { useDb, type Database, type Tx } from './db'
import { httpError } from './errors'
import { cachedSession, lookupMark, notifySessionsChanged, storeSession } from './session-cache'

export interface SessionUser {
  id: string
  email: string
  name: string
  role: Role
  companyId: string
  customerId: string | null
  sessionId: string
  /**
   * What a sentence for this person needs from the company (see readerContext in
   * services/company.ts), read with the session so a request does not read the company again.
   */
  reader?: ReaderContext
}

export interface ReaderContext { unitSystem: UnitSystem, companyUnitSystem: UnitSystem, phone: string, companyName: string, timeZone: string }

export function hashToken(token: string) {
  return createHash('sha256').update(token).digest('hex')
}

export function sessionTtlMs() {
  return Number(process.env.RILLBOOK_SESSION_TTL_HOURS || 12) * 3600_000
}

/**
 * The session cookie: set by the server at sign-in, HttpOnly (page script never sees the token),
 * SameSite=Lax, Secure when the request came over HTTPS. nuxt-auth in the browser keeps only a
 * non-secret marker cookie of its own (see nuxt.config.ts); scripts send `Authorization: Bearer`.
 */
export const SESSION_COOKIE = 'auth.token'

/** HTTPS as the browser sees it: the request itself, or the proxy's X-Forwarded-Proto when proxies are trusted. */
function servedOverHttps(event: H3Event) {
  if (process.env.RILLBOOK_SECURE_COOKIES === '1') return true
  return getRequestProtocol(event, { xForwardedProto: process.env.RILLBOOK_TRUST_PROXY === '1' }) === 'https'
}

function sessionCookieOptions(event: H3Event) {
  return { httpOnly: true, sameSite: 'lax' as const, secure: servedOverHttps(event), path: '/' }
}

export function setSessionCookie(event: H3Event, token: string) {
  setCookie(event, SESSION_COOKIE, token, { ...sessionCookieOptions(event), maxAge: Math.floor(sessionTtlMs() / 1000) })
}

export function clearSessionCookie(event: H3Event) {
  deleteCookie(event, SESSION_COOKIE, sessionCookieOptions(event))
}

/** Starts a session; returns the opaque token the client sends back as `Authorization: Bearer`. */
export async function createSession(userId: string, event: H3Event) {
  const token = randomBytes(32).toString('base64url')
  await useDb().insert(sessions).values({
    tokenHash: hashToken(token),
    userId,
    expiresAt: new Date(Date.now() + sessionTtlMs()),
    ip: requestIp(event),
    userAgent: getRequestHeader(event, 'user-agent')?.slice(0, 300) ?? null,
  })
  return token
}

export function requestIp(event: H3Event) {
  return getRequestIP(event, { xForwardedFor: process.env.RILLBOOK_TRUST_PROXY === '1' }) ?? 'unknown'
}

/**
 * The token from `Authorization: Bearer` or, when there is no Authorization header at all, from
 * the session cookie. A request with an Authorization header is never signed in by the cookie:
 * the CSRF middleware lets such requests through because they carry their own credential.
 */
function tokenFrom(event: H3Event): { token: string, from: 'header' | 'cookie' } | null {
  const header = getRequestHeader(event, 'authorization')
  if (header !== undefined) {
    const token = header.startsWith('Bearer ') ? header.slice(7).trim() : ''
    return token ? { token, from: 'header' } : null
  }
  const cookie = getCookie(event, SESSION_COOKIE)
  return cookie ? { token: cookie, from: 'cookie' } : null
}

/**
 * The signed-in user, or null. Looked up once per request, and kept a few seconds in the session
 * cache (server/utils/session-cache.ts), which every instance clears when a session ends.
 */
export async function getSessionUser(event: H3Event): Promise<SessionUser | null> {
  if (event.context.sessionUser !== undefined) return event.context.sessionUser
  const presented = tokenFrom(event)
  let found: SessionUser | null = null
  if (presented) {
    const tokenHash = hashToken(presented.token)
    found = cachedSession(tokenHash) ?? await lookUpSession(tokenHash)
    // An expired or revoked session's cookie is cleared rather than sent on every request.
    if (!found && presented.from === 'cookie') clearSessionCookie(event)
  }
  event.context.sessionUser = found
  return found
}

async function lookUpSession(tokenHash: string): Promise<SessionUser | null> {
  const mark = lookupMark()
  const [row] = await useDb()
    .select({
      id: users.id, email: users.email, name: users.name, role: users.role,
      companyId: users.companyId, customerId: users.customerId, sessionId: sessions.id, expiresAt: sessions.expiresAt,
      ownUnitSystem: users.unitSystem, companyUnitSystem: companies.unitSystem, phone: companies.phone, companyName: companies.name, timeZone: companies.timeZone,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .innerJoin(companies, eq(companies.id, users.companyId))
    .where(and(
      eq(sessions.tokenHash, tokenHash),
      isNull(sessions.revokedAt),
      gt(sessions.expiresAt, new Date()),
      eq(users.active, true),
    ))
    .limit(1)
  if (!row) return null
  const { expiresAt, ownUnitSystem, companyUnitSystem, phone, companyName, timeZone, ...rest } = row
  const user: SessionUser = { ...rest, reader: { unitSystem: ownUnitSystem ?? companyUnitSystem, companyUnitSystem, phone, companyName, timeZone } }
  storeSession(tokenHash, user, expiresAt, mark)
  return user
}

/**
 * The one guard every API route calls first. 401 without a valid session; 403 when the
 * role is not among `roles` or lacks `permission`.
 */
export async function requireUser(event: H3Event, opts: { roles?: readonly Role[], permission?: Permission } = {}): Promise<SessionUser> {
  const user = await getSessionUser(event)
  if (!user) throw httpError(401, 'Sign in to continue: no valid session')
  if (opts.roles && !opts.roles.includes(user.role)) {
    throw httpError(403, `This needs the ${opts.roles.join(' or ')} role; you are signed in as ${user.role}`)
  }
  if (opts.permission && !can(user.role, opts.permission)) {
    throw httpError(403, `Your role (${user.role}) may not do this (${opts.permission})`)
  }
  return user
}

/**
 * Ends every open session of a user (deactivation, password or role change), and tells every
 * instance to forget them; inside `db`'s transaction when one is given.
 */
export async function revokeUserSessions(userId: string, db: Database | Tx = useDb()) {
  await db.update(sessions).set({ revokedAt: new Date() })
    .where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt)))
  await notifySessionsChanged(db, { userId })
}

declare module 'h3' {
  interface H3EventContext {
    sessionUser?: SessionUser | null
  }
}

export function isStaff(user: SessionUser) {
  return user.role === 'owner' || user.role === 'technician'
}

/** The customer a customer-role user may see; staff see every customer of their company. */
export function ownCustomerId(user: SessionUser): string | null {
  if (isStaff(user)) return null
  if (!user.customerId) throw httpError(403, 'This sign-in is not linked to a customer')
  return user.customerId
}
