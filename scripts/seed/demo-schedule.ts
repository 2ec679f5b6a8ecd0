// Demo plans, two seasons of contracts and their visits, relative to today so the demo always has
// a finished season, a current one with visits done, today's stops and upcoming visits. The
// season planner chooses every visit's day and technician (demo-planning.ts).
import { and, eq, lt } from 'drizzle-orm'
import { closedDays, companies, contractFeatures, contracts, plans, planVisitTemplates, products, staffProfiles, visits } from '../../server/db/schema'
import { cancelFutureVisits, regenerateContractVisits } from '../../server/services/visit-generation'
import type { Tx } from '../../server/utils/db'
import { termEndFor } from '../../shared/utils/recurrence'
import { addDays, localToday } from '../../shared/utils/company-time'
import { demoClosedMonthDays, demoPlans } from './demo-plans'
import { demoProducts } from './demo-products'
import { planDemoSeason } from './demo-planning'

interface FeatureRef { id: string, kind: string, customerKey: string }

export async function seedSchedule(tx: Tx, companyId: string, demoId: (key: string) => string, features: FeatureRef[], customerKeys: string[]) {
  let added = 0
  /** Contracts this run created: only their visits get demo readings. */
  const created: string[] = []
  const [company] = await tx.select().from(companies).where(eq(companies.id, companyId)).limit(1)
  const today = localToday(company!.timeZone)
  const [year, month] = today.split('-').map(Number) as [number, number]
  const currentStart = `${month >= 3 ? year : year - 1}-03-01`
  const previousStart = `${Number(currentStart.slice(0, 4)) - 1}-03-01`

  await tx.update(companies).set({ baseLatitude: 44.141, baseLongitude: -91.352 }).where(eq(companies.id, companyId))
  for (const y of [Number(previousStart.slice(0, 4)), Number(previousStart.slice(0, 4)) + 1, Number(previousStart.slice(0, 4)) + 2]) {
    for (const [md, reason] of demoClosedMonthDays) {
      added += (await tx.insert(closedDays).values({ companyId, day: `${y}-${md}`, reason }).onConflictDoNothing().returning({ day: closedDays.day })).length
    }
  }
  const tess = demoId('tech-tess')
  const dario = demoId('tech-dario')
  await tx.insert(staffProfiles).values([
    { userId: tess, capacityMinutes: 420, homeLatitude: 44.131, homeLongitude: -91.362 },
    { userId: dario, capacityMinutes: 450, homeLatitude: 44.163, homeLongitude: -91.331 },
    { userId: demoId('owner'), capacityMinutes: 240, homeLatitude: 44.141, homeLongitude: -91.352 },
  ]).onConflictDoNothing()

  for (const { key, ...p } of demoProducts) {
    added += (await tx.insert(products).values({ id: demoId(key), companyId, ...p }).onConflictDoNothing().returning({ id: products.id })).length
  }

  for (const p of demoPlans) {
    const planId = demoId(p.key)
    const inserted = await tx.insert(plans).values({
      id: planId, companyId, name: p.name, description: p.description, priceMinor: p.priceMinor, currency: company!.currency,
      billingCadence: p.billingCadence, termMonths: p.termMonths, autoRenewDefault: true,
    }).onConflictDoNothing().returning({ id: plans.id })
    if (!inserted.length) continue
    added++
    await tx.insert(planVisitTemplates).values(p.templates.map((t, position) => ({
      id: demoId(`${p.key}-t${position}`), planId, position, visitType: t.visitType, rrule: t.rrule, seasonFrom: t.from, seasonTo: t.to, toleranceDays: t.toleranceDays,
      durationMinutes: t.durationMinutes, checklist: t.checklist.map(label => ({ label })),
    })))
  }

  // Which plan each customer is on, from what they have.
  const byCustomer = new Map<string, FeatureRef[]>()
  for (const f of features) byCustomer.set(f.customerKey, [...(byCustomer.get(f.customerKey) ?? []), f])
  const agreements: Array<{ customerKey: string, planKey: string, featureIds: string[], index: number }> = []
  customerKeys.forEach((ck, index) => {
    const fs = byCustomer.get(ck) ?? []
    const water = fs.filter(f => !['pondless_waterfall', 'fountain'].includes(f.kind))
    const dry = fs.filter(f => ['pondless_waterfall', 'fountain'].includes(f.kind))
    if (water.length) {
      const koi = water.some(f => f.kind === 'koi_pond')
      const planKey = koi && (ck === 'customer-whitcombe' || ck === 'customer-lantern-court' || index % 3 !== 2) ? 'plan-koi-year' : index % 5 === 4 ? 'plan-spring-fall' : 'plan-seasonal'
      agreements.push({ customerKey: ck, planKey, featureIds: water.map(f => f.id), index })
    }
    if (dry.length) agreements.push({ customerKey: ck, planKey: 'plan-pondless', featureIds: dry.map(f => f.id), index })
  })

  /** Contracts of each season this run created, and the agreement each belongs to. */
  const seasonContracts: { previous: string[], current: string[] } = { previous: [], current: [] }
  const agreementOf = new Map<string, (typeof agreements)[number]>()
  for (const a of agreements) {
    const customerId = demoId(a.customerKey)
    const plan = demoPlans.find(p => p.key === a.planKey)!
    const prevId = demoId(`contract-${a.customerKey}-${a.planKey}-previous`)
    const currId = demoId(`contract-${a.customerKey}-${a.planKey}-current`)
    const churned = a.index % 11 === 10
    const paused = a.index === 7
    const base = { companyId, customerId, planId: demoId(a.planKey), currency: company!.currency, priceOverrideMinor: a.customerKey === 'customer-lantern-court' ? 21_500 : null }
    const previous = await tx.insert(contracts).values({
      ...base, id: prevId, status: 'ended', termStart: previousStart, termEnd: termEndFor(previousStart, plan.termMonths),
      autoRenew: !churned, activatedAt: new Date(`${previousStart}T15:00:00Z`), endedAt: new Date(`${currentStart}T06:00:00Z`),
    }).onConflictDoNothing().returning({ id: contracts.id })
    if (!previous.length) continue
    added++
    created.push(prevId, ...(churned ? [] : [currId]))
    seasonContracts.previous.push(prevId)
    agreementOf.set(prevId, a)
    await tx.insert(contractFeatures).values(a.featureIds.map((featureId, position) => ({ contractId: prevId, featureId, position })))
    await regenerateContractVisits(tx, prevId, { now: new Date(`${addDays(previousStart, -7)}T12:00:00Z`) })
    if (!churned) {
      await tx.insert(contracts).values({
        ...base, id: currId, status: paused ? 'paused' : 'active', termStart: currentStart, termEnd: termEndFor(currentStart, plan.termMonths),
        autoRenew: true, previousContractId: prevId, activatedAt: new Date(`${currentStart}T15:00:00Z`),
        statusReason: paused ? 'Owner away for the season; resume on return' : '',
      })
      await tx.insert(contractFeatures).values(a.featureIds.map((featureId, position) => ({ contractId: currId, featureId, position })))
      await regenerateContractVisits(tx, currId, { now: new Date(`${addDays(currentStart, -7)}T12:00:00Z`) })
      if (paused) await cancelFutureVisits(tx, currId, 'Contract paused', { now: new Date(`${addDays(today, -40)}T12:00:00Z`) })
      seasonContracts.current.push(currId)
      agreementOf.set(currId, a)
    }
  }

  // The whole book planned by the season planner, one season at a time; a customer keeps last
  // season's technician where the planner can.
  const planning = { ...company!, id: companyId }
  const previousSeason = await planDemoSeason(tx, planning, seasonContracts.previous, today)
  await planDemoSeason(tx, planning, seasonContracts.current, today, previousSeason.assignments)

  // Past visits done (a few skipped).
  for (const contractId of [...seasonContracts.previous, ...seasonContracts.current]) {
    const a = agreementOf.get(contractId)!
    const past = await tx.select({ id: visits.id, startsAt: visits.startsAt, durationMinutes: visits.durationMinutes, status: visits.status, technicianId: visits.technicianId })
      .from(visits).where(and(eq(visits.contractId, contractId), lt(visits.scheduledOn, today)))
    for (const [i, v] of past.entries()) {
      if (v.status !== 'scheduled' || !v.technicianId) continue
      const skipped = (i + a.index) % 17 === 5
      const startedAt = new Date(v.startsAt.getTime() + ((i * 37 + a.index * 53) % 300) * 60_000)
      await tx.update(visits).set(skipped
        ? { status: 'skipped', statusReason: 'Gate locked; customer away' }
        : { status: 'done', startedAt, finishedAt: new Date(startedAt.getTime() + (v.durationMinutes + ((i % 5) - 2) * 5) * 60_000) })
        .where(eq(visits.id, v.id))
    }
  }

  // A signed-up customer whose first season starts next spring (a draft).
  const draftCustomer = customerKeys.find(k => k === 'customer-alcott')
  const draftFeature = features.find(f => f.customerKey === draftCustomer)
  if (draftCustomer && draftFeature) {
    const nextStart = `${Number(currentStart.slice(0, 4)) + 1}-03-01`
    added += (await tx.insert(contracts).values({
      id: demoId('contract-alcott-next'), companyId, customerId: demoId(draftCustomer), planId: demoId('plan-seasonal'), status: 'draft',
      termStart: nextStart, termEnd: termEndFor(nextStart, 12), currency: company!.currency, autoRenew: true, notes: 'Quote accepted by phone; activate once the deposit is in.',
    }).onConflictDoNothing().returning({ id: contracts.id })).length
  }
  return { added, contractIds: created }
}
