import { eq } from 'drizzle-orm'
import type { CompanyUpdateInput } from '../../shared/schemas/company'
import { companies } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'

const columns = {
  id: companies.id, name: companies.name, currency: companies.currency,
  taxRateBasisPoints: companies.taxRateBasisPoints, unitSystem: companies.unitSystem, timeZone: companies.timeZone,
}

export async function getCompany(actor: SessionUser) {
  const [row] = await useDb().select(columns).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  if (!row) throw httpError(404, 'No such company')
  return row
}

export async function updateCompany(actor: SessionUser, input: CompanyUpdateInput, ip: string) {
  await useDb().transaction(async (tx) => {
    await tx.update(companies).set(input).where(eq(companies.id, actor.companyId))
    await recordAudit(tx, { action: 'settings.changed', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'company', subjectId: actor.companyId, ip, detail: input })
  })
  return getCompany(actor)
}
