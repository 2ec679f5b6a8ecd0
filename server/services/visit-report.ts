import { WATER_ADVICE_SAFETY, safetySentence } from '../../shared/utils/safety'
import { and, asc, eq, gt, inArray } from 'drizzle-orm'
import { VISIT_TYPE_LABELS } from '../../shared/types/schedule'
import { formatLocalDate } from '../../shared/utils/company-time'
import { formatDose } from '../../shared/utils/water/format'
import { companies, customers, doses, photos, readings, sites, visits, waterFeatures } from '../db/schema'
import type { Tx } from '../utils/db'
import { escapeHtml } from '../utils/html'
import { callUs } from './alert-mail'
import { enqueueMail } from './mail'
import { contactEmails } from './recipients'

const STATUS_WORDS = { ok: 'in range', watch: 'worth watching', act: 'needs action' } as const

export const REPORT_CAUTIONS = WATER_ADVICE_SAFETY.map(safetySentence)

/** Storage key of a photo's thumbnail (see services/photos.ts). */
export const thumbKey = (photoId: string) => `photos/${photoId}/thumb.jpg`

/**
 * Writes the visit report e-mail to the outbox inside the finishing transaction: what was done,
 * readings with their status in plain words, doses, advice, photo thumbnails, the next visit.
 */
export async function queueVisitReport(tx: Tx, visitId: string) {
  const [v] = await tx.select({
    id: visits.id, companyId: visits.companyId, customerId: visits.customerId, visitType: visits.visitType, finishedAt: visits.finishedAt,
    checklist: visits.checklist, customerNotes: visits.customerNotes, scheduledOn: visits.scheduledOn,
    customerName: customers.name, siteName: sites.name, companyName: companies.name, timeZone: companies.timeZone,
    unitSystem: companies.unitSystem, phone: companies.phone,
  }).from(visits).innerJoin(customers, eq(customers.id, visits.customerId)).innerJoin(sites, eq(sites.id, visits.siteId))
    .innerJoin(companies, eq(companies.id, visits.companyId)).where(eq(visits.id, visitId)).limit(1)
  if (!v) return null
  const to = await contactEmails(tx, v.customerId, 'reports')
  const readingRows = await tx.select({ r: readings, featureName: waterFeatures.name }).from(readings)
    .innerJoin(waterFeatures, eq(waterFeatures.id, readings.featureId)).where(eq(readings.visitId, visitId)).orderBy(asc(readings.takenAt))
  const doseRows = await tx.select({ d: doses, featureName: waterFeatures.name }).from(doses)
    .innerJoin(waterFeatures, eq(waterFeatures.id, doses.featureId)).where(eq(doses.visitId, visitId)).orderBy(asc(doses.dosedAt))
  const photoRows = await tx.select({ id: photos.id, caption: photos.caption }).from(photos).where(eq(photos.visitId, visitId)).orderBy(asc(photos.createdAt)).limit(12)
  const [next] = await tx.select({ scheduledOn: visits.scheduledOn, visitType: visits.visitType }).from(visits)
    .where(and(eq(visits.customerId, v.customerId), gt(visits.scheduledOn, v.scheduledOn), inArray(visits.status, ['scheduled']))).orderBy(asc(visits.scheduledOn)).limit(1)

  const fmtDate = (d: string) => formatLocalDate(d, 'longWeekdayDate')
  const done = v.checklist.filter(c => c.state === 'done').map(c => c.label)
  const problems = v.checklist.filter(c => c.state === 'problem').map(c => `${c.label}: ${c.note ?? ''}`)
  const concerns = readingRows.flatMap(({ r, featureName }) => r.evaluation.filter(p => p.status !== 'ok').map(p => ({ featureName, ...p })))
  const advice = concerns.length
    ? [
        ...concerns.filter(c => c.status === 'act').map(c => `${c.featureName}: ${c.reason}. We will follow this up; ${callUs(v.phone, 'at once if fish gasp at the surface or stop feeding')}.`),
        ...concerns.filter(c => c.status === 'watch').map(c => `${c.featureName}: ${c.reason}. Feed lightly and we will retest next visit.`),
      ]
    : ['Everything we tested is in range. Keep the skimmer basket clear and top up with dechlorinated water if the level drops.']

  const subject = `${VISIT_TYPE_LABELS[v.visitType]} report — ${v.siteName}, ${fmtDate(v.scheduledOn)}`
  const readingLines = readingRows.flatMap(({ r, featureName }) => r.evaluation.map(p => ({ featureName, text: `${p.reason} (${STATUS_WORDS[p.status]})`, status: p.status })))
  const doseLines = doseRows.map(({ d, featureName }) => `${featureName}: ${d.productName} — ${formatDose(d.amount, d.unit, v.unitSystem)}`)

  const text = [
    `Hello ${v.customerName},`, '',
    `${v.companyName} finished the ${VISIT_TYPE_LABELS[v.visitType].toLowerCase()} at ${v.siteName} on ${fmtDate(v.scheduledOn)}.`, '',
    'What we did:', ...(done.length ? done.map(d => `- ${d}`) : ['- The visit checklist']), ...problems.map(p => `- Problem: ${p}`), '',
    'Water tests:', ...(readingLines.length ? readingLines.map(l => `- ${l.featureName}: ${l.text}`) : ['- No water test this visit']), '',
    'What we added:', ...(doseLines.length ? doseLines.map(d => `- ${d}`) : ['- Nothing this visit']), '',
    'Until the next visit:', ...advice.map(a => `- ${a}`), '',
    ...(v.customerNotes ? ['Notes from your technician:', v.customerNotes, ''] : []),
    next ? `Next visit: ${VISIT_TYPE_LABELS[next.visitType]} on ${fmtDate(next.scheduledOn)}.` : 'No further visit is booked yet.', '',
    ...(v.phone ? [`Questions? Call ${v.companyName} on ${v.phone}.`, ''] : []),
    'Please note:', ...REPORT_CAUTIONS.map(c => `- ${c}`),
  ].join('\n')

  const color = { ok: '#4e6426', watch: '#9c4617', act: '#8e2418' }
  const html = `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#1f1d1a;max-width:640px">
<h1 style="color:#0c3f3c;font-size:20px">${escapeHtml(subject)}</h1>
<p>Hello ${escapeHtml(v.customerName)},</p>
<p>${escapeHtml(v.companyName)} finished the ${escapeHtml(VISIT_TYPE_LABELS[v.visitType].toLowerCase())} at ${escapeHtml(v.siteName)} on ${escapeHtml(fmtDate(v.scheduledOn))}.</p>
<h2 style="font-size:16px">What we did</h2><ul>${(done.length ? done : ['The visit checklist']).map(d => `<li>${escapeHtml(d)}</li>`).join('')}${problems.map(p => `<li><strong>Problem:</strong> ${escapeHtml(p)}</li>`).join('')}</ul>
<h2 style="font-size:16px">Water tests</h2>${readingLines.length ? `<ul>${readingLines.map(l => `<li>${escapeHtml(l.featureName)}: ${escapeHtml(l.text.replace(/ \(.+\)$/, ''))} — <strong style="color:${color[l.status]}">${STATUS_WORDS[l.status]}</strong></li>`).join('')}</ul>` : '<p>No water test this visit.</p>'}
<h2 style="font-size:16px">What we added</h2>${doseLines.length ? `<ul>${doseLines.map(d => `<li>${escapeHtml(d)}</li>`).join('')}</ul>` : '<p>Nothing this visit.</p>'}
<h2 style="font-size:16px">Until the next visit</h2><ul>${advice.map(a => `<li>${escapeHtml(a)}</li>`).join('')}</ul>
${v.customerNotes ? `<h2 style="font-size:16px">Notes from your technician</h2><p>${escapeHtml(v.customerNotes)}</p>` : ''}
${photoRows.length ? `<h2 style="font-size:16px">Photos</h2><p>${photoRows.map(p => `<img src="cid:photo-${p.id}" alt="${escapeHtml(p.caption || 'Visit photo')}" width="160" style="margin:2px;border-radius:6px">`).join('')}</p>` : ''}
<p><strong>${next ? `Next visit: ${escapeHtml(VISIT_TYPE_LABELS[next.visitType])} on ${escapeHtml(fmtDate(next.scheduledOn))}.` : 'No further visit is booked yet.'}</strong></p>
${v.phone ? `<p>Questions? Call ${escapeHtml(v.companyName)} on <a href="tel:${escapeHtml(v.phone.replace(/[^\d+]/g, ''))}">${escapeHtml(v.phone)}</a>.</p>` : ''}
<p style="font-size:12px;color:#625b51">${REPORT_CAUTIONS.map(escapeHtml).join('<br>')}</p>
</body></html>`

  return enqueueMail(tx, {
    companyId: v.companyId, dedupeKey: `visit-report:${visitId}`, to, subject, html, text,
    attachments: photoRows.map(p => ({ cid: `photo-${p.id}`, filename: `photo-${p.id}.jpg`, contentType: 'image/jpeg', storageKey: thumbKey(p.id) })),
  })
}
