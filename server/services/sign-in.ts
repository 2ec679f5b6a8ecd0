import { and, count, eq, gt, sql } from 'drizzle-orm'
import { sessions, signInFailures, users } from '../db/schema'
import type { SignInInput } from '../../shared/schemas/auth'
import { hashPassword, verifyPassword } from '../utils/password'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { notifySessionsChanged } from '../utils/session-cache'
import { recordAudit } from './audit'

const env = (name: string, fallback: number) => Number(process.env[name] || fallback)
export const signInLimits = () => ({
  /** Failed attempts on one account before it is locked. */
  accountFailures: env('RILLBOOK_SIGNIN_MAX_FAILURES', 5),
  lockMinutes: env('RILLBOOK_SIGNIN_LOCK_MINUTES', 15),
  /** Failed attempts from one address within the window before it is refused. */
  addressFailures: env('RILLBOOK_SIGNIN_MAX_PER_ADDRESS', 30),
  windowMinutes: env('RILLBOOK_SIGNIN_WINDOW_MINUTES', 15),
})

let dummyHash: Promise<string> | undefined

/**
 * Checks an e-mail and password. Returns the user on success; otherwise throws 401 (wrong
 * credentials) or 429 (account locked, or too many failures from this address). Every outcome
 * is written to the audit log.
 */
export async function checkCredentials(input: SignInInput, ip: string) {
  const db = useDb()
  const limits = signInLimits()
  const since = new Date(Date.now() - limits.windowMinutes * 60_000)

  const [fromAddress] = await db.select({ n: count() }).from(signInFailures)
    .where(and(eq(signInFailures.ip, ip), gt(signInFailures.at, since)))
  if ((fromAddress?.n ?? 0) >= limits.addressFailures) {
    await recordAudit(db, { action: 'sign_in.rate_limited', ip, detail: { email: input.email } })
    throw httpError(429, `Too many failed sign-ins from this address; wait ${limits.windowMinutes} minutes and try again`)
  }

  const [user] = await db.select().from(users).where(eq(users.email, input.email)).limit(1)
  if (user?.lockedUntil && user.lockedUntil > new Date()) {
    await recordAudit(db, { action: 'sign_in.refused_locked', companyId: user.companyId, subjectType: 'user', subjectId: user.id, ip })
    const minutes = Math.ceil((user.lockedUntil.getTime() - Date.now()) / 60_000)
    throw httpError(429, `This account is locked after repeated failed sign-ins; try again in ${minutes} minute${minutes === 1 ? '' : 's'} or ask the owner to reset it`)
  }

  // Verify against a dummy hash for unknown e-mails so timing does not reveal which exist.
  dummyHash ??= hashPassword('not-a-real-password-for-timing')
  const ok = user
    ? await verifyPassword(user.passwordHash, input.password) && user.active
    : (await verifyPassword(await dummyHash, input.password), false)

  if (!ok) {
    await db.transaction(async (tx) => {
      await tx.insert(signInFailures).values({ ip, email: input.email })
      if (!user) {
        await recordAudit(tx, { action: 'sign_in.failure', ip, detail: { email: input.email, reason: 'unknown e-mail' } })
        return
      }
      const [updated] = await tx.update(users)
        .set({ failedSignIns: sql`${users.failedSignIns} + 1` })
        .where(eq(users.id, user.id))
        .returning({ failedSignIns: users.failedSignIns })
      const failures = updated?.failedSignIns ?? 0
      await recordAudit(tx, { action: 'sign_in.failure', companyId: user.companyId, subjectType: 'user', subjectId: user.id, ip, detail: { failures, reason: user.active ? 'wrong password' : 'account deactivated' } })
      if (failures >= limits.accountFailures) {
        await tx.update(users).set({ lockedUntil: new Date(Date.now() + limits.lockMinutes * 60_000), failedSignIns: 0 }).where(eq(users.id, user.id))
        await recordAudit(tx, { action: 'sign_in.locked', companyId: user.companyId, subjectType: 'user', subjectId: user.id, ip, detail: { minutes: limits.lockMinutes } })
      }
    })
    throw httpError(401, 'Wrong e-mail or password')
  }

  await db.transaction(async (tx) => {
    await tx.update(users).set({ failedSignIns: 0, lockedUntil: null, lastSignInAt: new Date() }).where(eq(users.id, user!.id))
    await recordAudit(tx, { action: 'sign_in.success', companyId: user!.companyId, actorUserId: user!.id, subjectType: 'user', subjectId: user!.id, ip })
  })
  return user!
}

/** Sign-out: ends one session, and every instance forgets it (session cache). */
export async function endSession(sessionId: string) {
  await useDb().transaction(async (tx) => {
    await tx.update(sessions).set({ revokedAt: new Date() }).where(eq(sessions.id, sessionId))
    await notifySessionsChanged(tx, { sessionId })
  })
}
