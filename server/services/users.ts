import { and, asc, count, eq, ilike, or, type SQL } from 'drizzle-orm'
import type { UserCreateInput, UserUpdateInput } from '../../shared/schemas/users'
import type { Role } from '../../shared/utils/roles'
import { customers, users } from '../db/schema'
import { revokeUserSessions, type SessionUser } from '../utils/auth'
import { notifySessionsChanged } from '../utils/session-cache'
import { hashPassword } from '../utils/password'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'

/** The columns that may leave the server: never the password hash. */
const publicColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  active: users.active,
  customerId: users.customerId,
  customerName: customers.name,
  lastSignInAt: users.lastSignInAt,
  lockedUntil: users.lockedUntil,
  createdAt: users.createdAt,
}

export async function listUsers(actor: SessionUser, q: { page: number, pageSize: number, q?: string, role?: Role }) {
  const db = useDb()
  const where: SQL[] = [eq(users.companyId, actor.companyId)]
  if (q.role) where.push(eq(users.role, q.role))
  if (q.q) where.push(or(ilike(users.name, `%${q.q}%`), ilike(users.email, `%${q.q}%`))!)
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select(publicColumns).from(users).leftJoin(customers, eq(customers.id, users.customerId))
      .where(cond).orderBy(asc(users.role), asc(users.name))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(users).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

async function getUser(actor: SessionUser, id: string) {
  const [row] = await useDb().select(publicColumns).from(users).leftJoin(customers, eq(customers.id, users.customerId))
    .where(and(eq(users.id, id), eq(users.companyId, actor.companyId))).limit(1)
  if (!row) throw httpError(404, 'No such user')
  return row
}

export async function createUser(actor: SessionUser, input: UserCreateInput, ip: string) {
  const db = useDb()
  if (input.customerId) {
    const [c] = await db.select({ id: customers.id }).from(customers)
      .where(and(eq(customers.id, input.customerId), eq(customers.companyId, actor.companyId))).limit(1)
    if (!c) throw httpError(400, 'Invalid body: customerId — no such customer', { fields: { customerId: 'No such customer' } })
  }
  const [taken] = await db.select({ id: users.id }).from(users).where(eq(users.email, input.email)).limit(1)
  if (taken) throw httpError(409, 'Invalid body: email — a sign-in with this e-mail already exists', { fields: { email: 'A sign-in with this e-mail already exists' } })
  const passwordHash = await hashPassword(input.password)
  const id = await db.transaction(async (tx) => {
    const [created] = await tx.insert(users).values({
      companyId: actor.companyId,
      email: input.email,
      name: input.name,
      role: input.role,
      passwordHash,
      customerId: input.role === 'customer' ? input.customerId ?? null : null,
    }).returning({ id: users.id })
    await recordAudit(tx, { action: 'user.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'user', subjectId: created!.id, ip, detail: { role: input.role, email: input.email } })
    return created!.id
  })
  return getUser(actor, id)
}

export async function updateUser(actor: SessionUser, id: string, input: UserUpdateInput, ip: string) {
  const db = useDb()
  const before = await getUser(actor, id)
  if (id === actor.id && (input.active === false || (input.role && input.role !== actor.role))) {
    throw httpError(400, 'Invalid body: you cannot deactivate yourself or change your own role', { fields: { [input.active === false ? 'active' : 'role']: 'Not on your own account' } })
  }
  if (input.role === 'customer' && !before.customerId) {
    throw httpError(400, 'Invalid body: role — a customer sign-in must be linked to a customer; create a new customer sign-in instead', { fields: { role: 'Needs a linked customer' } })
  }
  const passwordHash = input.password ? await hashPassword(input.password) : undefined
  await db.transaction(async (tx) => {
    await tx.update(users).set({
      ...(input.name !== undefined && { name: input.name }),
      ...(input.role !== undefined && { role: input.role }),
      ...(input.active !== undefined && { active: input.active }),
      ...(passwordHash && { passwordHash, passwordChangedAt: new Date(), failedSignIns: 0, lockedUntil: null }),
    }).where(and(eq(users.id, id), eq(users.companyId, actor.companyId)))
    const base = { companyId: actor.companyId, actorUserId: actor.id, subjectType: 'user', subjectId: id, ip }
    if (input.role && input.role !== before.role) {
      await recordAudit(tx, { ...base, action: 'user.role_changed', detail: { from: before.role, to: input.role } })
    }
    if (input.active !== undefined && input.active !== before.active) {
      await recordAudit(tx, { ...base, action: input.active ? 'user.reactivated' : 'user.deactivated' })
    }
    if (passwordHash) await recordAudit(tx, { ...base, action: 'user.password_reset' })
    if (input.name && input.name !== before.name) await recordAudit(tx, { ...base, action: 'user.renamed', detail: { from: before.name, to: input.name } })
    // Deactivation, a new password or a new role ends every open session of that user.
    if (input.active === false || passwordHash || (input.role && input.role !== before.role)) {
      await revokeUserSessions(id, tx)
    }
    else {
      // A new name: signed-in pages show it at once (session cache, every instance).
      await notifySessionsChanged(tx, { userId: id })
    }
  })
  return getUser(actor, id)
}
