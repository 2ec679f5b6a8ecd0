import { and, asc, count, desc, eq, inArray, type SQL } from 'drizzle-orm'
import type { RequestScheduleInput, ServiceRequestInput } from '../../shared/schemas/portal'
import { MAX_REQUEST_PHOTOS, REQUEST_KIND_LABELS, REQUEST_STATUS_LABELS, type RequestStatus } from '../../shared/types/requests'
import { VISIT_TYPE_LABELS } from '../../shared/types/schedule'
import { formatLocalDate, localToday } from '../../shared/utils/company-time'
import { localTimeToInstant } from '../../shared/utils/recurrence'
import { companies, customers, photos, serviceRequests, sites, users, visits, waterFeatures } from '../db/schema'
import { ownCustomerId, type SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { escapeHtml } from '../utils/html'
import type { PhotoFile } from '../utils/photo-upload'
import { publicAppUrl } from '../utils/payments'
import { recordAudit } from './audit'
import { enqueueMail } from './mail'
import { storePhoto } from './photos'
import { deepestAtSite, withSafety } from './visit-safety'
import { contactEmails, ownerEmails } from './recipients'

function scope(actor: SessionUser): SQL[] {
  const where: SQL[] = [eq(serviceRequests.companyId, actor.companyId)]
  const own = ownCustomerId(actor)
  if (own) where.push(eq(serviceRequests.customerId, own))
  return where
}

const columns = {
  id: serviceRequests.id, kind: serviceRequests.kind, status: serviceRequests.status, description: serviceRequests.description,
  preferredDates: serviceRequests.preferredDates, reply: serviceRequests.reply, createdAt: serviceRequests.createdAt, handledAt: serviceRequests.handledAt,
  customerId: serviceRequests.customerId, customerName: customers.name, siteId: serviceRequests.siteId, siteName: sites.name, siteLine1: sites.line1,
  featureId: serviceRequests.featureId, featureName: waterFeatures.name, visitId: serviceRequests.visitId,
  visitOn: visits.scheduledOn, visitStartsAt: visits.startsAt, visitStatus: visits.status,
}

function baseQuery(db: ReturnType<typeof useDb>) {
  return db.select(columns).from(serviceRequests)
    .innerJoin(customers, eq(customers.id, serviceRequests.customerId))
    .innerJoin(sites, eq(sites.id, serviceRequests.siteId))
    .leftJoin(waterFeatures, eq(waterFeatures.id, serviceRequests.featureId))
    .leftJoin(visits, eq(visits.id, serviceRequests.visitId))
}

export async function listRequests(actor: SessionUser, q: { page: number, pageSize: number, status?: RequestStatus | 'open' }) {
  const db = useDb()
  const where = scope(actor)
  if (q.status === 'open') where.push(inArray(serviceRequests.status, ['new', 'scheduled']))
  else if (q.status) where.push(eq(serviceRequests.status, q.status))
  const cond = and(...where)
  const [rows, [total], [waiting]] = await Promise.all([
    baseQuery(db).where(cond).orderBy(asc(serviceRequests.status), desc(serviceRequests.createdAt), asc(serviceRequests.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(serviceRequests).where(cond),
    db.select({ n: count() }).from(serviceRequests).where(and(...scope(actor), eq(serviceRequests.status, 'new'))),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize, waiting: waiting?.n ?? 0 }
}

export async function getRequest(actor: SessionUser, id: string) {
  const db = useDb()
  const [row] = await baseQuery(db).where(and(eq(serviceRequests.id, id), ...scope(actor))).limit(1)
  if (!row) throw httpError(404, 'No such request')
  const photoRows = await db.select({ id: photos.id, caption: photos.caption }).from(photos).where(eq(photos.requestId, id)).orderBy(asc(photos.createdAt))
  return { ...row, photos: photoRows }
}

/** A customer asks for a visit; the owner hears about it by e-mail (through the outbox). */
export async function createRequest(actor: SessionUser, input: ServiceRequestInput, ip: string) {
  const customerId = ownCustomerId(actor)
  if (!customerId) throw httpError(403, 'Requests are made by customers; staff book a visit on the schedule')
  const db = useDb()
  const [site] = await db.select({ id: sites.id, name: sites.name }).from(sites).where(and(eq(sites.id, input.siteId), eq(sites.customerId, customerId), eq(sites.companyId, actor.companyId))).limit(1)
  if (!site) throw httpError(400, 'Invalid body: siteId — not one of your places', { fields: { siteId: 'Not one of your places' } })
  if (input.featureId) {
    const [f] = await db.select({ id: waterFeatures.id }).from(waterFeatures).where(and(eq(waterFeatures.id, input.featureId), eq(waterFeatures.siteId, input.siteId))).limit(1)
    if (!f) throw httpError(400, 'Invalid body: featureId — not a water feature at this place', { fields: { featureId: 'Not a water feature at this place' } })
  }
  const [company] = await db.select({ timeZone: companies.timeZone }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
  const today = localToday(company!.timeZone)
  const past = input.preferredDates.findIndex(d => d < today)
  if (past > -1) throw httpError(400, `Invalid body: preferredDates.${past} — choose today or a later day`, { fields: { [`preferredDates.${past}`]: 'Today or later' } })
  const id = await db.transaction(async (tx) => {
    const [row] = await tx.insert(serviceRequests).values({
      companyId: actor.companyId, customerId, siteId: input.siteId, featureId: input.featureId ?? null, kind: input.kind,
      preferredDates: [...new Set(input.preferredDates)], description: input.description, createdBy: actor.id,
    }).returning({ id: serviceRequests.id })
    await recordAudit(tx, { action: 'request.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'request', subjectId: row!.id, ip, detail: { kind: input.kind } })
    const [cu] = await tx.select({ name: customers.name }).from(customers).where(eq(customers.id, customerId)).limit(1)
    const link = `${publicAppUrl()}/requests?open=${row!.id}`
    const subject = `New request from ${cu!.name}: ${REQUEST_KIND_LABELS[input.kind]}`
    const when = input.preferredDates.length ? `Preferred: ${input.preferredDates.join(', ')}` : 'No preferred dates'
    await enqueueMail(tx, {
      companyId: actor.companyId, dedupeKey: `request:${row!.id}:new`, to: await ownerEmails(tx, actor.companyId), subject,
      text: `${subject}\n${site.name}\n${when}\n\n${input.description}\n\nOpen the requests inbox: ${link}`,
      html: `<p><strong>${escapeHtml(subject)}</strong><br>${escapeHtml(site.name)}<br>${escapeHtml(when)}</p><p>${escapeHtml(input.description)}</p><p><a href="${escapeHtml(link)}">Open the requests inbox</a></p>`,
    })
    return row!.id
  })
  return getRequest(actor, id)
}

/** A photo for a request still waiting for an answer, by the customer who made it; at most five. */
export async function addRequestPhoto(actor: SessionUser, requestId: string, input: { id: string, file: PhotoFile, caption: string }, ip: string) {
  const db = useDb()
  const [r] = await db.select().from(serviceRequests).where(and(eq(serviceRequests.id, requestId), ...scope(actor))).limit(1)
  if (!r) throw httpError(404, 'No such request')
  const [existing] = await db.select().from(photos).where(eq(photos.id, input.id)).limit(1)
  if (existing) {
    if (existing.requestId !== requestId) throw httpError(409, 'A photo with this id belongs to something else')
    return existing
  }
  if (r.status !== 'new') throw httpError(409, 'This request has been answered; send a new one to add photos')
  return storePhoto(actor, { visitId: null, requestId, customerId: r.customerId, featureId: r.featureId }, input, { action: 'request.photo_added', subjectType: 'request', subjectId: requestId, ip }, async (tx) => {
    // The request row's lock keeps two uploads at once from passing the limit together.
    const [locked] = await tx.select({ status: serviceRequests.status }).from(serviceRequests).where(eq(serviceRequests.id, requestId)).for('update')
    if (locked?.status !== 'new') throw httpError(409, 'This request has been answered; send a new one to add photos')
    const [{ n }] = await tx.select({ n: count() }).from(photos).where(eq(photos.requestId, requestId)) as [{ n: number }]
    if (n >= MAX_REQUEST_PHOTOS) throw httpError(400, `Invalid body: file — at most ${MAX_REQUEST_PHOTOS} photos per request`, { fields: { file: `At most ${MAX_REQUEST_PHOTOS} photos` } })
  })
}

async function answer(tx: Tx, r: typeof serviceRequests.$inferSelect, subject: string, lines: string[]) {
  const link = `${publicAppUrl()}/portal/requests`
  await enqueueMail(tx, {
    companyId: r.companyId, dedupeKey: `request:${r.id}:${r.status === 'new' ? 'answer' : 'update'}:${Date.now()}`, to: await contactEmails(tx, r.customerId, 'alerts'), subject,
    text: [...lines, '', `See your requests: ${link}`].join('\n'),
    html: `${lines.map(l => `<p>${escapeHtml(l)}</p>`).join('')}<p><a href="${escapeHtml(link)}">See your requests</a></p>`,
  })
}

/** The owner books a visit for a request: the visit is on the schedule, the customer is told. */
export async function scheduleRequest(actor: SessionUser, id: string, input: RequestScheduleInput, ip: string) {
  const db = useDb()
  await db.transaction(async (tx) => {
    const [r] = await tx.select().from(serviceRequests).where(and(eq(serviceRequests.id, id), eq(serviceRequests.companyId, actor.companyId))).for('update').limit(1)
    if (!r) throw httpError(404, 'No such request')
    if (r.status !== 'new') throw httpError(409, `This request is already ${REQUEST_STATUS_LABELS[r.status].toLowerCase()}`)
    if (input.technicianId) {
      const [t] = await tx.select({ id: users.id }).from(users).where(and(eq(users.id, input.technicianId), eq(users.companyId, actor.companyId), inArray(users.role, ['technician', 'owner']), eq(users.active, true))).limit(1)
      if (!t) throw httpError(400, 'Invalid body: technicianId — no such technician', { fields: { technicianId: 'No such technician' } })
    }
    const [company] = await tx.select({ timeZone: companies.timeZone, name: companies.name, baseLatitude: companies.baseLatitude }).from(companies).where(eq(companies.id, actor.companyId)).limit(1)
    if (input.date < localToday(company!.timeZone)) throw httpError(400, 'Invalid body: date — choose today or a later day', { fields: { date: 'Today or later' } })
    const [v] = await tx.insert(visits).values({
      companyId: actor.companyId, customerId: r.customerId, siteId: r.siteId, visitType: input.visitType, scheduledOn: input.date,
      startsAt: localTimeToInstant(input.date, input.startTime, company!.timeZone), durationMinutes: input.durationMinutes,
      technicianId: input.technicianId ?? null, movedManually: true,
      checklist: withSafety([`${REQUEST_KIND_LABELS[r.kind]}: ${r.description.slice(0, 150)}`], { visitType: input.visitType, date: input.date, deepestM: await deepestAtSite(tx, r.siteId), latitude: company!.baseLatitude, treatment: r.kind === 'fish_problem' }),
      internalNotes: `Booked from the customer's request of ${r.createdAt.toISOString().slice(0, 10)}.`,
    }).returning({ id: visits.id })
    await tx.update(serviceRequests).set({ status: 'scheduled', visitId: v!.id, reply: input.reply, handledBy: actor.id, handledAt: new Date() }).where(eq(serviceRequests.id, id))
    await recordAudit(tx, { action: 'request.scheduled', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'request', subjectId: id, ip, detail: { visitId: v!.id, date: input.date } })
    const day = formatLocalDate(input.date, 'longWeekdayMonthDay')
    await answer(tx, r, `Visit booked: ${day}, ${input.startTime}`, [
      `${company!.name} booked a ${VISIT_TYPE_LABELS[input.visitType].toLowerCase()} visit for your request (${REQUEST_KIND_LABELS[r.kind].toLowerCase()}) on ${day} at about ${input.startTime}.`,
      ...(input.reply ? [input.reply] : []),
    ])
  })
  return getRequest(actor, id)
}

export async function declineRequest(actor: SessionUser, id: string, reply: string, ip: string) {
  const db = useDb()
  await db.transaction(async (tx) => {
    const [r] = await tx.select().from(serviceRequests).where(and(eq(serviceRequests.id, id), eq(serviceRequests.companyId, actor.companyId))).for('update').limit(1)
    if (!r) throw httpError(404, 'No such request')
    if (r.status !== 'new') throw httpError(409, `This request is already ${REQUEST_STATUS_LABELS[r.status].toLowerCase()}`)
    await tx.update(serviceRequests).set({ status: 'declined', reply, handledBy: actor.id, handledAt: new Date() }).where(eq(serviceRequests.id, id))
    await recordAudit(tx, { action: 'request.declined', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'request', subjectId: id, ip })
    await answer(tx, r, 'About your request', [reply])
  })
  return getRequest(actor, id)
}

