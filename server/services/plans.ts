import { and, asc, count, eq, ilike, inArray, isNotNull, isNull, notInArray, type SQL } from 'drizzle-orm'
import type { PlanInput, PlanUpdateInput } from '../../shared/schemas/plans'
import { contracts, plans, planVisitTemplates } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { containsPattern } from '../utils/like'
import { recordAudit } from './audit'
import { regenerateContractVisits } from './visit-generation'

export async function listPlans(actor: SessionUser, q: { page: number, pageSize: number, q?: string, status: 'current' | 'archived' | 'all' }) {
  const db = useDb()
  const where: SQL[] = [eq(plans.companyId, actor.companyId)]
  if (q.status === 'current') where.push(isNull(plans.archivedAt))
  if (q.status === 'archived') where.push(isNotNull(plans.archivedAt))
  if (q.q) where.push(ilike(plans.name, containsPattern(q.q)))
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select({
      id: plans.id, name: plans.name, description: plans.description, priceMinor: plans.priceMinor, currency: plans.currency,
      billingCadence: plans.billingCadence, termMonths: plans.termMonths, autoRenewDefault: plans.autoRenewDefault, archivedAt: plans.archivedAt,
    }).from(plans).where(cond).orderBy(asc(plans.name)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(plans).where(cond),
  ])
  const templates = rows.length
    ? await db.select().from(planVisitTemplates).where(inArray(planVisitTemplates.planId, rows.map(r => r.id))).orderBy(asc(planVisitTemplates.position))
    : []
  return {
    rows: rows.map(r => ({ ...r, templates: templates.filter(t => t.planId === r.id) })),
    total: total?.n ?? 0, page: q.page, pageSize: q.pageSize,
  }
}

export async function getPlan(actor: SessionUser, id: string) {
  const db = useDb()
  const [plan] = await db.select().from(plans).where(and(eq(plans.id, id), eq(plans.companyId, actor.companyId))).limit(1)
  if (!plan) throw httpError(404, 'No such plan')
  const templates = await db.select().from(planVisitTemplates).where(eq(planVisitTemplates.planId, id)).orderBy(asc(planVisitTemplates.position))
  const { companyId: _c, ...rest } = plan
  return { ...rest, templates }
}

async function writeTemplates(tx: Tx, planId: string, templates: PlanInput['templates']) {
  const keepIds = templates.flatMap(t => (t.id ? [t.id] : []))
  await tx.delete(planVisitTemplates).where(and(eq(planVisitTemplates.planId, planId), keepIds.length ? notInArray(planVisitTemplates.id, keepIds) : undefined))
  for (const [position, t] of templates.entries()) {
    const values = { visitType: t.visitType, rrule: t.rrule, seasonFrom: t.seasonFrom, seasonTo: t.seasonTo, toleranceDays: t.toleranceDays, durationMinutes: t.durationMinutes, checklist: t.checklist, position }
    if (t.id) {
      const updated = await tx.update(planVisitTemplates).set(values).where(and(eq(planVisitTemplates.id, t.id), eq(planVisitTemplates.planId, planId))).returning({ id: planVisitTemplates.id })
      if (!updated.length) throw httpError(400, `Invalid body: templates.${position}.id — not a template of this plan`, { fields: { [`templates.${position}.id`]: 'Not a template of this plan' } })
    }
    else {
      await tx.insert(planVisitTemplates).values({ ...values, planId })
    }
  }
}

export async function createPlan(actor: SessionUser, input: PlanInput, ip: string) {
  const id = await useDb().transaction(async (tx) => {
    const { templates, ...fields } = input
    const [created] = await tx.insert(plans).values({ ...fields, companyId: actor.companyId }).returning({ id: plans.id })
    await writeTemplates(tx, created!.id, templates.map(({ id: _ignored, ...t }) => t))
    await recordAudit(tx, { action: 'plan.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'plan', subjectId: created!.id, ip })
    return created!.id
  })
  return getPlan(actor, id)
}

/** Updates a plan; its active contracts' future, unstarted visits follow the new templates. */
export async function updatePlan(actor: SessionUser, id: string, input: PlanUpdateInput, ip: string) {
  await getPlan(actor, id)
  const regenerated = await useDb().transaction(async (tx) => {
    const { templates, archived, ...fields } = input
    const set = { ...fields, ...(archived !== undefined && { archivedAt: archived ? new Date() : null }) }
    if (Object.keys(set).length) await tx.update(plans).set(set).where(and(eq(plans.id, id), eq(plans.companyId, actor.companyId)))
    if (templates) await writeTemplates(tx, id, templates)
    await recordAudit(tx, { action: 'plan.updated', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'plan', subjectId: id, ip, detail: { fields: Object.keys(input) } })
    if (!templates) return 0
    const active = await tx.select({ id: contracts.id }).from(contracts).where(and(eq(contracts.planId, id), eq(contracts.status, 'active')))
    for (const c of active) await regenerateContractVisits(tx, c.id)
    return active.length
  })
  return { ...(await getPlan(actor, id)), regeneratedContracts: regenerated }
}
