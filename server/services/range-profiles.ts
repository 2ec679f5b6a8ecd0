import { and, asc, eq } from 'drizzle-orm'
import type { RangeTable } from '../../shared/types/water'
import { DEFAULT_PROFILES } from '../../shared/utils/water-chemistry'
import { rangeProfiles } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Database, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'

/** Gives a company the three default profiles it does not have yet (idempotent). */
export async function ensureDefaultProfiles(db: Database | Tx, companyId: string) {
  await db.insert(rangeProfiles)
    .values(Object.values(DEFAULT_PROFILES).map(p => ({ companyId, key: p.key, name: p.name, ranges: p.ranges })))
    .onConflictDoNothing()
}

export async function listRangeProfiles(actor: SessionUser) {
  await ensureDefaultProfiles(useDb(), actor.companyId)
  const rows = await useDb().select({ id: rangeProfiles.id, key: rangeProfiles.key, name: rangeProfiles.name, ranges: rangeProfiles.ranges, updatedAt: rangeProfiles.updatedAt })
    .from(rangeProfiles).where(eq(rangeProfiles.companyId, actor.companyId)).orderBy(asc(rangeProfiles.name)).limit(100)
  return { rows, total: rows.length, page: 1, pageSize: 100 }
}

export async function updateRangeProfile(actor: SessionUser, id: string, input: { name?: string, ranges?: RangeTable }, ip: string) {
  return useDb().transaction(async (tx) => {
    const [row] = await tx.update(rangeProfiles).set(input)
      .where(and(eq(rangeProfiles.id, id), eq(rangeProfiles.companyId, actor.companyId)))
      .returning({ id: rangeProfiles.id, key: rangeProfiles.key, name: rangeProfiles.name, ranges: rangeProfiles.ranges })
    if (!row) throw httpError(404, 'No such range profile')
    await recordAudit(tx, { action: 'range_profile.updated', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'range_profile', subjectId: id, ip, detail: input as Record<string, unknown> })
    return row
  })
}
