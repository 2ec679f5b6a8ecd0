import { and, asc, count, desc, eq, getTableColumns, gte, inArray, isNull, lte, sql } from 'drizzle-orm'
import type { CustomerReadingInput, PreferencesInput } from '../../shared/schemas/portal'
import type { Parameter } from '../../shared/types/water'
import { adviceFor } from '../../shared/utils/advice'
import { addDays, localToday } from '../../shared/utils/company-time'
import { PARAMETER_LIST } from '../../shared/utils/water/parameters'
import { companies, customerContacts, doses, outbox, photos, products, readings, sites, users, visits, waterFeatures } from '../db/schema'
import { ownCustomerId, type SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { recordAudit } from './audit'
import { notifySessionsChanged } from '../utils/session-cache'
import { readerContext } from './company'
import { rangesFor } from './features'
import { evaluateAtSite, measuredValues, readingRow, upsertReading } from './readings'

/** The customer this sign-in belongs to (the portal is for customers only). */
function customerOf(actor: SessionUser) {
  const own = ownCustomerId(actor)
  if (!own) throw httpError(403, 'The portal is for customers')
  return own
}

/** A UV bulb is due about yearly (common practice, no source; the same rule as the alert scan). */
const UV_BULB_DAYS = 365

/**
 * The customer's water features, each with its latest test in plain words (and the trend since
 * the test before), the next visit at its site, its equipment and what is due.
 */
export async function portalFeatures(actor: SessionUser) {
  const customerId = customerOf(actor)
  const db = useDb()
  const [company] = await db.select({ timeZone: companies.timeZone }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  const today = localToday(company!.timeZone)
  const features = await db.select({ f: waterFeatures, siteName: sites.name }).from(waterFeatures).innerJoin(sites, eq(sites.id, waterFeatures.siteId))
    .where(and(eq(waterFeatures.customerId, customerId), eq(waterFeatures.companyId, actor.companyId), isNull(waterFeatures.archivedAt))).orderBy(asc(sites.name), asc(waterFeatures.name))
  if (!features.length) return { today, features: [] }
  const ids = features.map(x => x.f.id)
  // The two latest tests of each feature, in one query.
  const ranked = db.select({ ...getTableColumns(readings), rn: sql<number>`row_number() over (partition by ${readings.featureId} order by ${readings.takenAt} desc)`.as('rn') })
    .from(readings).where(inArray(readings.featureId, ids)).as('ranked')
  const latest = await db.select().from(ranked).where(lte(ranked.rn, 2))
  const reader = await readerContext(actor)
  const next = await db.select({ siteId: visits.siteId, on: sql<string>`min(${visits.scheduledOn})` }).from(visits)
    .where(and(eq(visits.customerId, customerId), inArray(visits.status, ['scheduled', 'in_progress']), gte(visits.scheduledOn, today))).groupBy(visits.siteId)
  const nextBySite = new Map(next.map(n => [n.siteId, n.on]))
  return {
    today,
    features: await Promise.all(features.map(async ({ f, siteName }) => {
      const mine = latest.filter(r => r.featureId === f.id).sort((a, b) => Number(a.rn) - Number(b.rn))
      const [last, before] = mine
      const previous: Partial<Record<Parameter, number | null>> = Object.fromEntries(PARAMETER_LIST.map(p => [p.key, before?.[p.key] ?? null]))
      const nextVisit = nextBySite.get(f.siteId) ?? null
      const evaluation = (last?.evaluation ?? []) as Parameters<typeof adviceFor>[0]
      const bulb = f.equipment.uvClarifier?.bulbInstalledOn ?? null
      const due: Array<{ what: string, when: string | null, overdue: boolean }> = []
      if (nextVisit) due.push({ what: 'Next visit', when: nextVisit, overdue: false })
      if (bulb) {
        const when = addDays(bulb, UV_BULB_DAYS)
        due.push({ what: 'UV bulb replacement (about yearly)', when, overdue: when < today })
      }
      const { ranges } = await rangesFor(actor.companyId, f)
      return {
        id: f.id, name: f.name, kind: f.kind, siteId: f.siteId, siteName, volumeL: f.measuredVolumeL ?? f.computedVolumeL, fish: f.fish,
        equipment: f.equipment, ranges, nextVisit, due,
        latest: last ? { id: last.id, takenAt: last.takenAt, source: last.source, evaluation, nh3MgL: last.nh3MgL } : null,
        advice: adviceFor(evaluation, previous, nextVisit, { unitSystem: reader.unitSystem, phone: reader.phone, nh3WatchMgL: ranges.nh3MgL?.watchAbove ?? null, computed: last ? { nh3MgL: last.nh3MgL, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: last.doSaturationPct } : undefined }),
        phone: reader.phone,
      }
    })),
  }
}

/** The company's treatments a customer may dose between visits, named by what they are, with their label rates. */
export async function portalTreatments(actor: SessionUser) {
  customerOf(actor)
  return useDb().select({ id: products.id, name: products.name, kind: products.kind, labelAmount: products.labelAmount, labelUnit: products.labelUnit, labelPerLitres: products.labelPerLitres, cautions: products.cautions })
    .from(products).where(and(eq(products.companyId, actor.companyId), isNull(products.archivedAt), inArray(products.kind, ['dechlorinator', 'bacteria', 'kh_buffer', 'salt']))).orderBy(asc(products.kind), asc(products.name))
}

/**
 * A test the customer took themselves, saved as customer-entered and evaluated against the
 * feature's ranges like any other (so the alert scan sees it). Sending the same id twice keeps one.
 */
export async function addCustomerReading(actor: SessionUser, input: CustomerReadingInput, ip: string) {
  const customerId = customerOf(actor)
  const db = useDb()
  const [row] = await db.select({ f: waterFeatures, altitudeM: sites.altitudeM }).from(waterFeatures).innerJoin(sites, eq(sites.id, waterFeatures.siteId))
    .where(and(eq(waterFeatures.id, input.featureId), eq(waterFeatures.customerId, customerId), eq(waterFeatures.companyId, actor.companyId))).limit(1)
  if (!row) throw httpError(400, 'Invalid body: featureId — not one of your water features', { fields: { featureId: 'Not one of your water features' } })
  const takenAt = new Date(input.takenAt)
  if (takenAt.getTime() > Date.now() + 10 * 60_000) throw httpError(400, 'Invalid body: takenAt — the test cannot be in the future', { fields: { takenAt: 'Not in the future' } })
  if (takenAt.getTime() < Date.now() - 14 * 86_400_000) throw httpError(400, 'Invalid body: takenAt — enter tests from the last two weeks', { fields: { takenAt: 'Within the last two weeks' } })
  const [clash] = await db.select({ featureId: readings.featureId, enteredBy: readings.enteredBy }).from(readings).where(eq(readings.id, input.id)).limit(1)
  if (clash && (clash.featureId !== input.featureId || clash.enteredBy !== actor.id)) throw httpError(409, 'A reading with this id already exists')
  const values = measuredValues(input)
  const { ranges } = await rangesFor(actor.companyId, row.f)
  const reader = await readerContext(actor)
  // Stored reasons are in the company's units, like a technician's; the advice is in the reader's.
  const evaluation = evaluateAtSite(values, { ranges, altitudeM: row.altitudeM, unitSystem: reader.companyUnitSystem })
  await db.transaction(async (tx) => {
    await upsertReading(tx, readingRow({ id: input.id, companyId: actor.companyId, featureId: input.featureId, visitId: null, takenAt, enteredBy: actor.id, source: 'customer' }, values, evaluation))
    await recordAudit(tx, { action: 'reading.customer_entered', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'feature', subjectId: input.featureId, ip, detail: { readingId: input.id, overall: evaluation.overall } })
  })
  return {
    id: input.id, overall: evaluation.overall, evaluation: evaluation.parameters,
    advice: adviceFor(evaluation.parameters, {}, null, { unitSystem: reader.unitSystem, phone: reader.phone, computed: evaluation.computed }), phone: reader.phone,
  }
}

/** The customer's finished visits, newest first, paged. */
export async function portalVisits(actor: SessionUser, q: { page: number, pageSize: number }) {
  const customerId = customerOf(actor)
  const db = useDb()
  const cond = and(eq(visits.companyId, actor.companyId), eq(visits.customerId, customerId), eq(visits.status, 'done'))
  const rs = sql<number>`(select count(*)::int from ${readings} r where r.visit_id = ${sql.identifier('visits')}.${sql.identifier('id')})`
  const ps = sql<number>`(select count(*)::int from ${photos} p where p.visit_id = ${sql.identifier('visits')}.${sql.identifier('id')})`
  const [rows, [total]] = await Promise.all([
    db.select({ id: visits.id, scheduledOn: visits.scheduledOn, visitType: visits.visitType, finishedAt: visits.finishedAt, siteName: sites.name, readings: rs, photos: ps })
      .from(visits).innerJoin(sites, eq(sites.id, visits.siteId)).where(cond).orderBy(desc(visits.scheduledOn), desc(visits.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(visits).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

/** One visit report: what was done, the tests in plain words, doses, photos, notes, and the e-mail as sent. */
export async function portalVisitReport(actor: SessionUser, id: string) {
  const customerId = customerOf(actor)
  const db = useDb()
  const [v] = await db.select({ v: visits, siteName: sites.name, technicianName: users.name }).from(visits).innerJoin(sites, eq(sites.id, visits.siteId)).leftJoin(users, eq(users.id, visits.technicianId))
    .where(and(eq(visits.id, id), eq(visits.companyId, actor.companyId), eq(visits.customerId, customerId), eq(visits.status, 'done'))).limit(1)
  if (!v) throw httpError(404, 'No such visit report')
  const readingRows = await db.select({ r: readings, featureName: waterFeatures.name }).from(readings).innerJoin(waterFeatures, eq(waterFeatures.id, readings.featureId)).where(eq(readings.visitId, id)).orderBy(asc(readings.takenAt))
  const doseRows = await db.select({ featureName: waterFeatures.name, productName: doses.productName, amount: doses.amount, unit: doses.unit, isTopUp: doses.isTopUp }).from(doses).innerJoin(waterFeatures, eq(waterFeatures.id, doses.featureId)).where(eq(doses.visitId, id)).orderBy(asc(doses.dosedAt))
  const photoRows = await db.select({ id: photos.id, caption: photos.caption }).from(photos).where(eq(photos.visitId, id)).orderBy(asc(photos.createdAt))
  const [mail] = await db.select({ subject: outbox.subject, html: outbox.html, text: outbox.text, sentAt: outbox.sentAt, to: outbox.to }).from(outbox).where(eq(outbox.dedupeKey, `visit-report:${id}`)).limit(1)
  return {
    id, scheduledOn: v.v.scheduledOn, visitType: v.v.visitType, finishedAt: v.v.finishedAt, siteName: v.siteName, technicianName: v.technicianName,
    done: v.v.checklist.filter(c => c.state === 'done').map(c => c.label),
    problems: v.v.checklist.filter(c => c.state === 'problem').map(c => ({ label: c.label, note: c.note ?? '' })),
    notes: v.v.customerNotes,
    readings: readingRows.map(({ r, featureName }) => ({ id: r.id, featureName, takenAt: r.takenAt, overall: r.overall, evaluation: r.evaluation })),
    doses: doseRows, photos: photoRows,
    email: mail ?? null,
  }
}

/** Who at the customer gets what by e-mail, and the units this sign-in reads in. */
export async function getPreferences(actor: SessionUser) {
  const customerId = customerOf(actor)
  const db = useDb()
  const contacts = await db.select({ id: customerContacts.id, name: customerContacts.name, email: customerContacts.email, getsReports: customerContacts.getsReports, getsInvoices: customerContacts.getsInvoices, getsAlerts: customerContacts.getsAlerts })
    .from(customerContacts).where(eq(customerContacts.customerId, customerId)).orderBy(asc(customerContacts.position))
  const [me] = await db.select({ unitSystem: users.unitSystem }).from(users).where(eq(users.id, actor.id)).limit(1)
  const [company] = await db.select({ unitSystem: companies.unitSystem }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  return { unitSystem: me?.unitSystem ?? null, companyUnitSystem: company!.unitSystem, contacts }
}

export async function updatePreferences(actor: SessionUser, input: PreferencesInput, ip: string) {
  const customerId = customerOf(actor)
  const db = useDb()
  if (input.contacts) {
    const mine = await db.select({ id: customerContacts.id }).from(customerContacts).where(eq(customerContacts.customerId, customerId))
    const ids = new Set(mine.map(c => c.id))
    const bad = input.contacts.findIndex(c => !ids.has(c.id))
    if (bad > -1) throw httpError(400, `Invalid body: contacts.${bad}.id — not one of your contacts`, { fields: { [`contacts.${bad}.id`]: 'Not one of your contacts' } })
  }
  await db.transaction(async (tx) => {
    if (input.unitSystem !== undefined) {
      await tx.update(users).set({ unitSystem: input.unitSystem }).where(eq(users.id, actor.id))
      // The units travel with the session (session cache, every instance).
      await notifySessionsChanged(tx, { userId: actor.id })
    }
    for (const c of input.contacts ?? []) {
      await tx.update(customerContacts).set({ getsReports: c.getsReports, getsInvoices: c.getsInvoices, getsAlerts: c.getsAlerts }).where(and(eq(customerContacts.id, c.id), eq(customerContacts.customerId, customerId)))
    }
    await recordAudit(tx, { action: 'portal.preferences', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'customer', subjectId: customerId, ip, detail: { ...input } })
  })
  return getPreferences(actor)
}
