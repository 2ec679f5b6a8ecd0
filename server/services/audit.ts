import { auditLog } from '../db/schema'
import type { Database, Tx } from '../utils/db'

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
  await db.insert(auditLog).values({
    action: entry.action,
    companyId: entry.companyId ?? null,
    actorUserId: entry.actorUserId ?? null,
    subjectType: entry.subjectType,
    subjectId: entry.subjectId,
    detail: entry.detail ?? {},
    ip: entry.ip ?? null,
  })
}
