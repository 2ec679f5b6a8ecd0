// The e-mails an alert scan sends: one message per person per feature per scan, naming every
// result that needs action, in words that match the severity, with the company's number
// wherever a customer is told to call, and (for the owner) a link to book a retest visit.
import { CHEMICAL_SAFETY, SAFETY_CAUTIONS, safetySentence } from '../../shared/utils/safety'
import { createHash } from 'node:crypto'
import { and, desc, eq, inArray, sql } from 'drizzle-orm'
import { alerts, companies, customerContacts, users, visits, waterFeatures } from '../db/schema'
import type { Tx } from '../utils/db'
import { escapeHtml } from '../utils/html'
import { publicAppUrl } from '../utils/payments'
import { enqueueMail } from './mail'
import { ownerEmails } from './recipients'

type Alert = typeof alerts.$inferSelect

/** Cautions every alert e-mail carries (PRODUCT.md, Safety). */
export const ALERT_CAUTIONS = [...CHEMICAL_SAFETY, SAFETY_CAUTIONS.electrical].map(safetySentence)

/** "Call us on (555) 014-2290" — or, with no number on file, wording that promises none. */
export function callUs(phone: string, when: string): string {
  return phone ? `call us on ${phone} ${when}` : `reply to this e-mail ${when}`
}

const list = (lines: string[]) => `<ul>${lines.map(l => `<li>${escapeHtml(l)}</li>`).join('')}</ul>`
const para = (lines: string[]) => lines.map(l => `<p>${escapeHtml(l)}</p>`).join('')

/** The link in the owner's e-mail: the alerts page opens the retest offer for this alert. */
export function retestLink(alertId: string) {
  return `${publicAppUrl()}/alerts?retest=${alertId}`
}

/**
 * Sends the `act` alerts of one feature raised by one scan: one message to the owners (with the
 * retest link), one to the feature's technician, one to the customer's contacts who want alerts.
 * The dedupe key is the set of alerts, so a repeat run of the same scan sends nothing twice.
 */
export async function notifyFeatureAlerts(tx: Tx, group: Alert[]) {
  const first = group[0]
  if (!first) return
  const [company] = await tx.select({ name: companies.name, phone: companies.phone }).from(companies).where(eq(companies.id, first.companyId)).limit(1)
  const [feature] = first.featureId
    ? await tx.select({ name: waterFeatures.name, customerId: waterFeatures.customerId, siteId: waterFeatures.siteId }).from(waterFeatures).where(eq(waterFeatures.id, first.featureId)).limit(1)
    : []
  const key = createHash('sha256').update(group.map(a => a.id).sort().join(',')).digest('hex').slice(0, 32)
  const titles = group.map(a => a.title)
  const where = feature ? feature.name : 'Alert'
  const subject = `Act today: ${where} — ${group.length === 1 ? first.title.slice(0, 80) : `${group.length} results need action`}`

  const owners = await ownerEmails(tx, first.companyId)
  const link = retestLink(first.id)
  const ownerLines = [
    ...(feature ? [`Book a retest visit for the next working day in one click: ${link}`] : []),
    `Open alerts: ${publicAppUrl()}/alerts`,
    'Fish are at risk when ammonia or nitrite climb or oxygen falls: act today.',
  ]
  await enqueueMail(tx, {
    companyId: first.companyId, dedupeKey: `alerts:${key}:owner`, to: owners, subject,
    text: [`${where}:`, ...titles.map(t => `- ${t}`), '', ...ownerLines, '', ...ALERT_CAUTIONS].join('\n'),
    html: `<p><strong>${escapeHtml(where)}</strong></p>${list(titles)}${feature ? `<p><a href="${escapeHtml(link)}">Book a retest visit for the next working day</a></p>` : ''}${para(ownerLines.slice(feature ? 1 : 0))}<p style="font-size:12px">${ALERT_CAUTIONS.map(escapeHtml).join('<br>')}</p>`,
  })

  if (feature && first.featureId) {
    const [tech] = await tx.select({ email: users.email }).from(visits).innerJoin(users, eq(users.id, visits.technicianId))
      .where(and(eq(visits.siteId, feature.siteId), sql`${visits.technicianId} is not null`, eq(users.active, true))).orderBy(desc(visits.scheduledOn)).limit(1)
    const techTo = tech && !owners.includes(tech.email) ? [tech.email] : []
    const techLines = ['The owner has been told and may book a retest visit.', `Open alerts: ${publicAppUrl()}/alerts`]
    await enqueueMail(tx, {
      companyId: first.companyId, dedupeKey: `alerts:${key}:technician`, to: techTo, subject,
      text: [`${where}:`, ...titles.map(t => `- ${t}`), '', ...techLines, '', ...ALERT_CAUTIONS].join('\n'),
      html: `<p><strong>${escapeHtml(where)}</strong></p>${list(titles)}${para(techLines)}<p style="font-size:12px">${ALERT_CAUTIONS.map(escapeHtml).join('<br>')}</p>`,
    })

    const contacts = await tx.select({ email: customerContacts.email }).from(customerContacts)
      .where(and(eq(customerContacts.customerId, feature.customerId), eq(customerContacts.getsAlerts, true)))
    const to = [...new Set(contacts.flatMap(c => (c.email ? [c.email] : [])))]
    const phone = company?.phone ?? ''
    const until = [
      `${company?.name ?? 'We'} will be in touch today.`,
      `Until then: feed lightly or not at all, keep the pump and aerator running, and ${callUs(phone, 'at once if fish gasp at the surface')}.`,
    ]
    await enqueueMail(tx, {
      companyId: first.companyId, dedupeKey: `alerts:${key}:customer`, to, subject: `Your ${feature.name} needs attention today`,
      text: [`Our latest test of your ${feature.name}:`, ...titles.map(t => `- ${t}`), '', ...until, '', ...ALERT_CAUTIONS].join('\n'),
      html: `<p>Our latest test of your ${escapeHtml(feature.name)}:</p>${list(titles)}${para(until)}<p style="font-size:12px">${ALERT_CAUTIONS.map(escapeHtml).join('<br>')}</p>`,
    })
  }
  await tx.update(alerts).set({ notifiedAt: new Date() }).where(inArray(alerts.id, group.map(a => a.id)))
}
