import { and, asc, count, desc, eq, ilike, inArray, or, sql, type SQL } from 'drizzle-orm'
import type { ContractAction, ContractInput, ContractUpdateInput } from '../../shared/schemas/contracts'
import type { ContractStatus } from '../../shared/types/schedule'
import { termEndFor } from '../../shared/utils/recurrence'
import { addDays } from '../../shared/utils/company-time'
import { contractFeatures, contracts, customers, plans, visits, waterFeatures } from '../db/schema'
import { ownCustomerId, type SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { containsPattern } from '../utils/like'
import { recordAudit, recordAudits } from './audit'
import { cancelFutureVisits, regenerateContractVisits, regenerateManyContractVisits, type GenerationClock } from './visit-generation'

function scope(actor: SessionUser): SQL[] {
  const where: SQL[] = [eq(contracts.companyId, actor.companyId)]
  const own = ownCustomerId(actor)
  if (own) where.push(eq(contracts.customerId, own))
  return where
}

const listColumns = {
  id: contracts.id, status: contracts.status, termStart: contracts.termStart, termEnd: contracts.termEnd,
  customerId: contracts.customerId, customerName: customers.name, planId: contracts.planId, planName: plans.name,
  billingCadence: plans.billingCadence, priceMinor: sql<number>`coalesce(${contracts.priceOverrideMinor}, ${plans.priceMinor})`,
  currency: contracts.currency, autoRenew: contracts.autoRenew, previousContractId: contracts.previousContractId,
}

export async function listContracts(actor: SessionUser, q: { page: number, pageSize: number, q?: string, status?: ContractStatus, customerId?: string, sort: 'termEnd' | 'customer' | 'plan' | 'status', dir: 'asc' | 'desc' }) {
  const db = useDb()
  const where = scope(actor)
  if (q.status) where.push(eq(contracts.status, q.status))
  if (q.customerId) where.push(eq(contracts.customerId, q.customerId))
  if (q.q) where.push(or(ilike(customers.name, containsPattern(q.q)), ilike(plans.name, containsPattern(q.q)))!)
  const sortCol = { termEnd: contracts.termEnd, customer: customers.name, plan: plans.name, status: contracts.status }[q.sort]
  const cond = and(...where)
  const [rows, [total]] = await Promise.all([
    db.select(listColumns).from(contracts).innerJoin(customers, eq(customers.id, contracts.customerId)).innerJoin(plans, eq(plans.id, contracts.planId))
      .where(cond).orderBy(q.dir === 'desc' ? desc(sortCol) : asc(sortCol), asc(contracts.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(contracts).innerJoin(customers, eq(customers.id, contracts.customerId)).innerJoin(plans, eq(plans.id, contracts.planId)).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

export async function getContract(actor: SessionUser, id: string) {
  const db = useDb()
  const [row] = await db.select({ ...listColumns, notes: contracts.notes, priceOverrideMinor: contracts.priceOverrideMinor, statusReason: contracts.statusReason, activatedAt: contracts.activatedAt, endedAt: contracts.endedAt })
    .from(contracts).innerJoin(customers, eq(customers.id, contracts.customerId)).innerJoin(plans, eq(plans.id, contracts.planId))
    .where(and(eq(contracts.id, id), ...scope(actor))).limit(1)
  if (!row) throw httpError(404, 'No such contract')
  const [features, visitCounts, renewal] = await Promise.all([
    db.select({ id: waterFeatures.id, name: waterFeatures.name, kind: waterFeatures.kind, siteId: waterFeatures.siteId })
      .from(contractFeatures).innerJoin(waterFeatures, eq(waterFeatures.id, contractFeatures.featureId))
      .where(eq(contractFeatures.contractId, id)).orderBy(asc(contractFeatures.position)),
    db.select({ status: visits.status, n: count() }).from(visits).where(eq(visits.contractId, id)).groupBy(visits.status),
    db.select({ id: contracts.id }).from(contracts).where(eq(contracts.previousContractId, id)).limit(1),
  ])
  return { ...row, features, visitCounts: Object.fromEntries(visitCounts.map(v => [v.status, v.n])), renewedById: renewal[0]?.id ?? null }
}

async function checkParts(actor: SessionUser, customerId: string, planId: string | null, featureIds: string[]) {
  const db = useDb()
  if (planId) {
    const [plan] = await db.select({ id: plans.id, archivedAt: plans.archivedAt }).from(plans).where(and(eq(plans.id, planId), eq(plans.companyId, actor.companyId))).limit(1)
    if (!plan) throw httpError(400, 'Invalid body: planId — no such plan', { fields: { planId: 'No such plan' } })
    if (plan.archivedAt) throw httpError(400, 'Invalid body: planId — this plan is archived', { fields: { planId: 'This plan is archived' } })
  }
  const [customer] = await db.select({ id: customers.id }).from(customers).where(and(eq(customers.id, customerId), eq(customers.companyId, actor.companyId))).limit(1)
  if (!customer) throw httpError(400, 'Invalid body: customerId — no such customer', { fields: { customerId: 'No such customer' } })
  const own = await db.select({ id: waterFeatures.id }).from(waterFeatures)
    .where(and(inArray(waterFeatures.id, featureIds), eq(waterFeatures.customerId, customerId), eq(waterFeatures.companyId, actor.companyId)))
  if (own.length !== new Set(featureIds).size) throw httpError(400, 'Invalid body: featureIds — every feature must belong to this customer', { fields: { featureIds: 'Every feature must belong to this customer' } })
}

async function writeFeatures(tx: Tx, contractId: string, featureIds: string[]) {
  await tx.delete(contractFeatures).where(eq(contractFeatures.contractId, contractId))
  await tx.insert(contractFeatures).values([...new Set(featureIds)].map((featureId, position) => ({ contractId, featureId, position })))
}

export async function createContract(actor: SessionUser, input: ContractInput, ip: string) {
  await checkParts(actor, input.customerId, input.planId, input.featureIds)
  const db = useDb()
  const [plan] = await db.select().from(plans).where(eq(plans.id, input.planId)).limit(1)
  const id = await db.transaction(async (tx) => {
    const [created] = await tx.insert(contracts).values({
      companyId: actor.companyId, customerId: input.customerId, planId: input.planId, status: 'draft',
      termStart: input.termStart, termEnd: termEndFor(input.termStart, plan!.termMonths),
      priceOverrideMinor: input.priceOverrideMinor ?? null, currency: plan!.currency,
      autoRenew: input.autoRenew ?? plan!.autoRenewDefault, notes: input.notes,
    }).returning({ id: contracts.id })
    await writeFeatures(tx, created!.id, input.featureIds)
    await recordAudit(tx, { action: 'contract.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'contract', subjectId: created!.id, ip, detail: { planId: input.planId, termStart: input.termStart } })
    return created!.id
  })
  return getContract(actor, id)
}

export async function updateContract(actor: SessionUser, id: string, input: ContractUpdateInput, ip: string) {
  const before = await getContract(actor, id)
  if (['ended', 'cancelled'].includes(before.status)) throw httpError(409, `This contract is ${before.status}; renew it or start a new one`)
  if (input.termStart && before.status !== 'draft') throw httpError(400, 'Invalid body: termStart — the start of an active term cannot move; end it and start a new one', { fields: { termStart: 'Only a draft can change its start' } })
  if (input.featureIds) await checkParts(actor, before.customerId, null, input.featureIds)
  await useDb().transaction(async (tx) => {
    const { featureIds, ...fields } = input
    const set: Partial<typeof contracts.$inferInsert> = { ...fields }
    if (input.termStart) {
      const [plan] = await tx.select({ termMonths: plans.termMonths }).from(plans).where(eq(plans.id, before.planId)).limit(1)
      set.termEnd = termEndFor(input.termStart, plan!.termMonths)
    }
    if (Object.keys(set).length) await tx.update(contracts).set(set).where(and(eq(contracts.id, id), eq(contracts.companyId, actor.companyId)))
    if (featureIds) await writeFeatures(tx, id, featureIds)
    await recordAudit(tx, { action: 'contract.updated', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'contract', subjectId: id, ip, detail: { ...input } })
    if (before.status === 'active') await regenerateContractVisits(tx, id)
  })
  return getContract(actor, id)
}

const ALLOWED: Record<ContractAction['action'], ContractStatus[]> = {
  activate: ['draft'],
  pause: ['active'],
  resume: ['paused'],
  end: ['active', 'paused'],
  cancel: ['draft', 'active', 'paused'],
  renew: ['active', 'ended'],
}

function checkAllowed(act: ContractAction, status: ContractStatus, renewed: boolean) {
  if (!ALLOWED[act.action].includes(status)) {
    throw httpError(409, `A ${status} contract cannot ${act.action}; allowed from: ${ALLOWED[act.action].join(', ')}`)
  }
  if (act.action === 'renew' && renewed) throw httpError(409, 'This contract has already been renewed')
}

/**
 * Moves a contract through its lifecycle; visits follow. Every step is audited. The contract row
 * is locked and its state checked again inside the transaction, so actions sent at once take
 * turns: five renewals at once make one renewal and four 409s.
 */
export async function actOnContract(actor: SessionUser, id: string, act: ContractAction, ip: string, clock: GenerationClock = {}) {
  const before = await getContract(actor, id)
  checkAllowed(act, before.status, before.renewedById !== null)
  const result = await useDb().transaction(async (tx) => {
    const [locked] = await tx.select({ status: contracts.status }).from(contracts).where(and(eq(contracts.id, id), eq(contracts.companyId, actor.companyId))).for('update').limit(1)
    if (!locked) throw httpError(404, 'No such contract')
    const [next] = await tx.select({ id: contracts.id }).from(contracts).where(eq(contracts.previousContractId, id)).limit(1)
    checkAllowed(act, locked.status, next !== undefined)
    const base = { companyId: actor.companyId, actorUserId: actor.id, subjectType: 'contract', ip }
    const setStatus = async (status: ContractStatus, extra: Partial<typeof contracts.$inferInsert> = {}) => {
      await tx.update(contracts).set({ status, statusReason: act.reason, ...extra }).where(eq(contracts.id, id))
      await recordAudit(tx, { ...base, subjectId: id, action: `contract.${act.action}`, detail: { from: locked.status, to: status, reason: act.reason } })
    }
    switch (act.action) {
      case 'activate':
        await setStatus('active', { activatedAt: new Date() })
        return { id, visits: await regenerateContractVisits(tx, id, clock) }
      case 'resume':
        await setStatus('active')
        return { id, visits: await regenerateContractVisits(tx, id, clock) }
      case 'pause':
        await setStatus('paused')
        return { id, cancelledVisits: await cancelFutureVisits(tx, id, 'Contract paused', clock) }
      case 'end':
        await setStatus('ended', { endedAt: new Date() })
        return { id, cancelledVisits: await cancelFutureVisits(tx, id, 'Contract ended', clock) }
      case 'cancel':
        await setStatus('cancelled', { endedAt: new Date() })
        return { id, cancelledVisits: await cancelFutureVisits(tx, id, 'Contract cancelled', clock) }
      case 'renew': {
        const next = await renewInTx(tx, id, { actorUserId: actor.id, ip, clock })
        return { id: next.id, visits: next.visits }
      }
    }
  })
  return { ...result, contract: await getContract(actor, result.id) }
}

/**
 * Starts the next term of a contract (same plan, price, features and renewal setting) with its
 * visits, inside the caller's transaction. The contract row is locked first and a term already
 * renewed is a 409 (the unique index on `previous_contract_id` backs this), so a retried or
 * concurrent renewal cannot make two.
 */
export async function renewInTx(tx: Tx, id: string, opts: { actorUserId: string | null, ip: string | null, clock?: GenerationClock }) {
  const [prev] = await tx.select().from(contracts).where(eq(contracts.id, id)).for('update').limit(1)
  if (!prev) throw httpError(404, 'No such contract')
  const [renewed] = await tx.select({ id: contracts.id }).from(contracts).where(eq(contracts.previousContractId, id)).limit(1)
  if (renewed) throw httpError(409, 'This contract has already been renewed')
  const [plan] = await tx.select().from(plans).where(eq(plans.id, prev!.planId)).limit(1)
  const termStart = addDays(prev!.termEnd, 1)
  const [next] = await tx.insert(contracts).values({
    companyId: prev!.companyId, customerId: prev!.customerId, planId: prev!.planId, status: 'active',
    termStart, termEnd: termEndFor(termStart, plan!.termMonths), priceOverrideMinor: prev!.priceOverrideMinor,
    currency: prev!.currency, autoRenew: prev!.autoRenew, previousContractId: id, notes: prev!.notes, activatedAt: opts.clock?.now ?? new Date(),
  }).returning({ id: contracts.id })
  const features = await tx.select({ featureId: contractFeatures.featureId }).from(contractFeatures).where(eq(contractFeatures.contractId, id)).orderBy(asc(contractFeatures.position))
  await writeFeatures(tx, next!.id, features.map(f => f.featureId))
  const base = { companyId: prev!.companyId, actorUserId: opts.actorUserId, subjectType: 'contract', ip: opts.ip }
  await recordAudit(tx, { ...base, subjectId: id, action: 'contract.renew', detail: { next: next!.id, termStart } })
  await recordAudit(tx, { ...base, subjectId: next!.id, action: 'contract.created', detail: { renews: id } })
  return { id: next!.id, termStart, visits: await regenerateContractVisits(tx, next!.id, opts.clock) }
}

/**
 * Renews a batch of contracts (the billing job) in the caller's transaction, with a few
 * statements for the batch: the terms are locked, the next terms inserted in one statement (the
 * unique index on `previous_contract_id` skips any already renewed, by whoever), their features
 * copied with one `insert … select`, the audit written in one statement, and the new terms'
 * visits planned together (one planner run per company). Returns the renewals made.
 */
export async function renewManyInTx(tx: Tx, ids: readonly string[], opts: { clock?: GenerationClock } = {}) {
  if (!ids.length) return []
  const prevs = await tx.select({ contract: contracts, termMonths: plans.termMonths }).from(contracts).innerJoin(plans, eq(plans.id, contracts.planId))
    .where(inArray(contracts.id, [...ids])).orderBy(asc(contracts.id)).for('update', { of: contracts })
  if (!prevs.length) return []
  const activatedAt = opts.clock?.now ?? new Date()
  const made = await tx.insert(contracts).values(prevs.map(({ contract: prev, termMonths }) => {
    const termStart = addDays(prev.termEnd, 1)
    return {
      companyId: prev.companyId, customerId: prev.customerId, planId: prev.planId, status: 'active' as const,
      termStart, termEnd: termEndFor(termStart, termMonths), priceOverrideMinor: prev.priceOverrideMinor,
      currency: prev.currency, autoRenew: prev.autoRenew, previousContractId: prev.id, notes: prev.notes, activatedAt,
    }
  })).onConflictDoNothing({ target: contracts.previousContractId }).returning({ id: contracts.id, previousId: contracts.previousContractId, companyId: contracts.companyId, termStart: contracts.termStart })
  if (!made.length) return []
  const newIds = made.map(m => m.id)
  await tx.execute(sql`
    insert into contract_features (contract_id, feature_id, position)
    select n.id, f.feature_id, f.position from contracts n join contract_features f on f.contract_id = n.previous_contract_id
    where n.id in ${sql`(${sql.join(newIds.map(id => sql`${id}::uuid`), sql`, `)})`}`)
  await recordAudits(tx, made.flatMap(m => [
    { companyId: m.companyId, actorUserId: null, subjectType: 'contract', ip: null, subjectId: m.previousId!, action: 'contract.renew', detail: { next: m.id, termStart: m.termStart } },
    { companyId: m.companyId, actorUserId: null, subjectType: 'contract', ip: null, subjectId: m.id, action: 'contract.created', detail: { renews: m.previousId } },
  ]))
  const visitsOf = await regenerateManyContractVisits(tx, newIds, opts.clock)
  return made.map(m => ({ id: m.id, previousId: m.previousId!, termStart: m.termStart, visits: visitsOf.get(m.id) }))
}
