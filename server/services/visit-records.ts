import { and, asc, eq, inArray, notInArray, sql } from 'drizzle-orm'
import type { VisitRecordInput } from '../../shared/schemas/visit-record'
import { companies, contractFeatures, doses, photos, products, readings, serviceRequests, sites, visits, waterFeatures } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { rangesFor } from './features'
import { evaluateAtSite, measuredValues, ofVisit, readingRow, sitePressureKPa, upsertReading } from './readings'
import { queueVisitReport } from './visit-report'
import { flushOutbox } from './mail'

type Visit = typeof visits.$inferSelect

/** The visit, if the caller may work on it: the owner, or the technician it is assigned to. */
async function workableVisit(actor: SessionUser, id: string, db: ReturnType<typeof useDb> | Tx = useDb(), lock = false): Promise<Visit> {
  const where = and(eq(visits.id, id), eq(visits.companyId, actor.companyId))
  const [v] = lock ? await db.select().from(visits).where(where).for('update').limit(1) : await db.select().from(visits).where(where).limit(1)
  if (!v) throw httpError(404, 'No such visit')
  if (actor.role !== 'owner' && v.technicianId !== actor.id) throw httpError(403, 'This visit is assigned to someone else')
  return v
}

/** The features a visit covers: its contract's features at its site (or every feature at the site). */
async function visitFeatures(v: Visit) {
  const db = useDb()
  const rows = v.contractId
    ? await db.select({ feature: waterFeatures }).from(contractFeatures).innerJoin(waterFeatures, eq(waterFeatures.id, contractFeatures.featureId))
      .where(and(eq(contractFeatures.contractId, v.contractId), eq(waterFeatures.siteId, v.siteId))).orderBy(asc(contractFeatures.position))
    : await db.select({ feature: waterFeatures }).from(waterFeatures).where(eq(waterFeatures.siteId, v.siteId)).orderBy(asc(waterFeatures.name))
  const [site] = await db.select({ altitudeM: sites.altitudeM }).from(sites).where(eq(sites.id, v.siteId)).limit(1)
  return Promise.all(rows.map(async ({ feature: f }) => ({
    id: f.id, name: f.name, kind: f.kind, volumeL: f.measuredVolumeL ?? f.computedVolumeL, fish: f.fish,
    equipment: f.equipment, ranges: (await rangesFor(v.companyId, f)).ranges,
    altitudeM: site?.altitudeM ?? null, pressureKPa: sitePressureKPa(site?.altitudeM),
  })))
}

/** Everything the visit page needs: the visit, its features with ranges, what has been recorded, the catalogue. */
export async function getVisitRecord(actor: SessionUser, id: string) {
  const v = await workableVisit(actor, id)
  const db = useDb()
  const [features, readingRows, doseRows, photoRows, catalogue] = await Promise.all([
    visitFeatures(v),
    db.select().from(readings).where(eq(readings.visitId, id)).orderBy(asc(readings.takenAt)),
    db.select().from(doses).where(eq(doses.visitId, id)).orderBy(asc(doses.dosedAt)),
    db.select({ id: photos.id, featureId: photos.featureId, caption: photos.caption, width: photos.width, height: photos.height, createdAt: photos.createdAt }).from(photos).where(eq(photos.visitId, id)).orderBy(asc(photos.createdAt)),
    db.select().from(products).where(and(eq(products.companyId, actor.companyId), sql`${products.archivedAt} is null`)).orderBy(asc(products.name)).limit(100),
  ])
  const { companyId: _c, generationKey: _g, ...visit } = v
  return { visit, features, readings: readingRows, doses: doseRows, photos: photoRows, products: catalogue }
}

/** A visit starts: arrival time recorded (idempotent). */
export async function startVisit(actor: SessionUser, id: string, ip: string) {
  const v = await workableVisit(actor, id)
  if (v.status === 'in_progress') return getVisitRecord(actor, id)
  if (v.status !== 'scheduled') throw httpError(409, `This visit is ${v.status.replace('_', ' ')}`)
  await useDb().transaction(async (tx) => {
    await tx.update(visits).set({ status: 'in_progress', startedAt: new Date(), sequence: sql`${visits.sequence} + 1` }).where(eq(visits.id, id))
    await recordAudit(tx, { action: 'visit.started', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'visit', subjectId: id, ip })
  })
  return getVisitRecord(actor, id)
}

/**
 * Saves the whole record as the phone holds it, in one transaction: checklist, notes, readings
 * and doses upserted by their client-made ids (a resubmission changes nothing), and readings or
 * doses the technician removed are deleted. Each reading is evaluated against its feature's ranges.
 * A reading or dose id that belongs to another visit is a 409, also when two visits race for the
 * same new id: the upsert only ever updates a row of this visit. Saves of one visit take turns
 * (the visit row is locked).
 */
export async function saveVisitRecord(actor: SessionUser, id: string, input: VisitRecordInput, ip: string, tx?: Tx) {
  const run = async (t: Tx) => {
    const v = await workableVisit(actor, id, t, true)
    if (v.status !== 'in_progress') throw httpError(409, v.status === 'scheduled' ? 'Start the visit first' : `This visit is ${v.status.replace('_', ' ')} and cannot change`)
    const features = await visitFeatures(v)
    const byId = new Map(features.map(f => [f.id, f]))
    for (const [i, r] of input.readings.entries()) if (!byId.has(r.featureId)) throw httpError(400, `Invalid body: readings.${i}.featureId — not a feature of this visit`, { fields: { [`readings.${i}.featureId`]: 'Not a feature of this visit' } })
    for (const [i, d] of input.doses.entries()) if (!byId.has(d.featureId)) throw httpError(400, `Invalid body: doses.${i}.featureId — not a feature of this visit`, { fields: { [`doses.${i}.featureId`]: 'Not a feature of this visit' } })
    // Ids are the client's: refuse one that belongs to another visit.
    const ids = input.readings.map(r => r.id)
    if (ids.length) {
      const clash = await t.select({ id: readings.id }).from(readings).where(and(inArray(readings.id, ids), sql`${readings.visitId} is distinct from ${id}`)).limit(1)
      if (clash.length) throw httpError(409, 'A reading with this id belongs to another visit')
    }
    const doseIds = input.doses.map(d => d.id)
    if (doseIds.length) {
      const clash = await t.select({ id: doses.id }).from(doses).where(and(inArray(doses.id, doseIds), sql`${doses.visitId} is distinct from ${id}`)).limit(1)
      if (clash.length) throw httpError(409, 'A dose with this id belongs to another visit')
    }
    await t.update(visits).set({ checklist: input.checklist, customerNotes: input.customerNotes, internalNotes: input.internalNotes }).where(eq(visits.id, id))
    await t.delete(readings).where(and(eq(readings.visitId, id), ids.length ? notInArray(readings.id, ids) : undefined))
    // Stored reasons are written in the company's units (every reader of the record shares them).
    const [company] = await t.select({ unitSystem: companies.unitSystem }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
    for (const [i, r] of input.readings.entries()) {
      const f = byId.get(r.featureId)!
      const values = measuredValues(r)
      const evaluation = evaluateAtSite(values, { ranges: f.ranges, altitudeM: f.altitudeM, unitSystem: company!.unitSystem, fieldPrefix: `readings.${i}.` })
      const row = readingRow({ id: r.id, companyId: actor.companyId, featureId: r.featureId, visitId: id, takenAt: new Date(r.takenAt), enteredBy: actor.id, source: 'technician' }, values, evaluation)
      if (!await upsertReading(t, row, ofVisit(id))) throw httpError(409, 'A reading with this id belongs to another visit')
    }
    await t.delete(doses).where(and(eq(doses.visitId, id), doseIds.length ? notInArray(doses.id, doseIds) : undefined))
    for (const d of input.doses) {
      const { id: did, dosedAt, ...rest } = d
      const row = { ...rest, productId: rest.productId ?? null, companyId: actor.companyId, visitId: id, dosedAt: new Date(dosedAt) }
      const [kept] = await t.insert(doses).values({ id: did, ...row }).onConflictDoUpdate({ target: doses.id, set: row, setWhere: eq(doses.visitId, id) }).returning({ id: doses.id })
      if (!kept) throw httpError(409, 'A dose with this id belongs to another visit')
    }
    await recordAudit(t, { action: 'visit.recorded', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'visit', subjectId: id, ip, detail: { readings: ids.length, doses: doseIds.length } })
  }
  if (tx) await run(tx)
  else await useDb().transaction(run)
  return getVisitRecord(actor, id)
}

/**
 * Finishes a visit: saves the last record, sets the departure time and queues the report e-mail
 * in the same transaction; then asks the outbox to send. Finishing twice is harmless.
 */
export async function finishVisit(actor: SessionUser, id: string, input: VisitRecordInput | undefined, ip: string) {
  const v = await workableVisit(actor, id)
  if (v.status === 'done') return getVisitRecord(actor, id)
  await useDb().transaction(async (tx) => {
    if (input) await saveVisitRecord(actor, id, input, ip, tx)
    const [locked] = await tx.select({ status: visits.status }).from(visits).where(eq(visits.id, id)).for('update').limit(1)
    if (locked!.status !== 'in_progress') throw httpError(409, 'Start the visit first')
    await tx.update(visits).set({ status: 'done', finishedAt: new Date(), sequence: sql`${visits.sequence} + 1` }).where(eq(visits.id, id))
    await recordAudit(tx, { action: 'visit.finished', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'visit', subjectId: id, ip })
    // A customer's request booked as this visit is done with it.
    await tx.update(serviceRequests).set({ status: 'done' }).where(and(eq(serviceRequests.visitId, id), eq(serviceRequests.status, 'scheduled')))
    await queueVisitReport(tx, id)
  })
  void flushOutbox().catch(() => {})
  return getVisitRecord(actor, id)
}

export async function skipVisit(actor: SessionUser, id: string, reason: string, ip: string) {
  const v = await workableVisit(actor, id)
  if (!['scheduled', 'in_progress'].includes(v.status)) throw httpError(409, `This visit is ${v.status.replace('_', ' ')}`)
  await useDb().transaction(async (tx) => {
    await tx.update(visits).set({ status: 'skipped', statusReason: reason, sequence: sql`${visits.sequence} + 1` }).where(eq(visits.id, id))
    await recordAudit(tx, { action: 'visit.skipped', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'visit', subjectId: id, ip, detail: { reason } })
  })
  return getVisitRecord(actor, id)
}
