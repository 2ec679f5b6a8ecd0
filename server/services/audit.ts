import { and, count, desc, eq, like, sql, type SQL } from 'drizzle-orm'
import { auditLog, users } from '../db/schema'
import { useDb, type Database, type Tx } from '../utils/db'

export interface AuditEntry {
  action: string
  companyId?: string | null
  actorUserId?: string | null
  subjectType?: string
  subjectId?: string
  detail?: Record<string, unknown>
  ip?: string | null
}

/** Appends to the audit log, inside the caller's transaction when one is given. */
export async function recordAudit(db: Database | Tx, entry: AuditEntry) {
  await recordAudits(db, [entry])
}

/**
 * Appends many entries with one statement (batch jobs): the rows go as one JSON parameter, so a
 * batch of thousands costs one parameter to build and send, not seven per row.
 */
export async function recordAudits(db: Database | Tx, entries: readonly AuditEntry[]) {
  if (!entries.length) return
  const rows = entries.map(e => ({
    action: e.action, company_id: e.companyId ?? null, actor_user_id: e.actorUserId ?? null,
    subject_type: e.subjectType ?? null, subject_id: e.subjectId ?? null, detail: e.detail ?? {}, ip: e.ip ?? null,
  }))
  await db.execute(sql`insert into ${auditLog} (action, company_id, actor_user_id, subject_type, subject_id, detail, ip)
    select r.action, r.company_id, r.actor_user_id, r.subject_type, r.subject_id, coalesce(r.detail, '{}'::jsonb), r.ip
    from jsonb_to_recordset(${JSON.stringify(rows)}::jsonb) as r(action text, company_id uuid, actor_user_id uuid, subject_type text, subject_id text, detail jsonb, ip text)`)
}

export async function listAudit(companyId: string, q: { page: number, pageSize: number, subjectId?: string, action?: string }) {
  const db = useDb()
  const where: SQL[] = [eq(auditLog.companyId, companyId)]
  if (q.subjectId) where.push(eq(auditLog.subjectId, q.subjectId))
  if (q.action) where.push(like(auditLog.action, `${q.action}%`))
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select({
      id: auditLog.id, at: auditLog.at, action: auditLog.action, actorUserId: auditLog.actorUserId,
      actorName: users.name, subjectType: auditLog.subjectType, subjectId: auditLog.subjectId, detail: auditLog.detail, ip: auditLog.ip,
    }).from(auditLog).leftJoin(users, eq(users.id, auditLog.actorUserId))
      .where(cond).orderBy(desc(auditLog.at), desc(auditLog.id))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(auditLog).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}
