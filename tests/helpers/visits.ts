import { api, demo, tokenFor, uniqueEmail } from './api'

/**
 * A fresh visit for Tess today: a new customer with a report contact, a site and a koi pond, a
 * contract on a one-visit plan, and its visit moved to today and assigned to her.
 */
export async function visitForTessToday(label: string, where: { latitude: number, longitude: number } = { latitude: 44.151, longitude: -91.341 }) {
  const owner = await tokenFor(demo.owner)
  const reportTo = uniqueEmail(`report-${label}`)
  const c = await api('/api/customers', { method: 'POST', token: owner, body: { name: `Visit Test ${label}`, kind: 'household', contacts: [{ name: 'Report Reader', email: reportTo, getsReports: true }] } })
  const s = await api('/api/sites', { method: 'POST', token: owner, body: { customerId: c.body.id, name: 'Home', line1: '5 Test Row', city: 'Larchfield', ...where } })
  const f = await api('/api/features', { method: 'POST', token: owner, body: { siteId: s.body.id, name: 'Test koi pond', kind: 'koi_pond', shape: { kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 1.2 }, fish: [{ kind: 'koi', count: 6 }] } })
  const year = new Date().getUTCFullYear() + 1
  const plan = await api('/api/plans', { method: 'POST', token: owner, body: { name: `One visit ${label}`, priceMinor: 10_000, currency: 'USD', billingCadence: 'per_visit', termMonths: 12, templates: [{ visitType: 'routine', rrule: 'FREQ=YEARLY;BYMONTH=6;BYDAY=MO;BYSETPOS=1', durationMinutes: 60, checklist: [{ label: 'Skimmer emptied' }, { label: 'Water tested' }] }] } })
  const contract = await api('/api/contracts', { method: 'POST', token: owner, body: { customerId: c.body.id, planId: plan.body.id, featureIds: [f.body.id], termStart: `${year}-01-01` } })
  await api(`/api/contracts/${contract.body.id}/actions`, { method: 'POST', token: owner, body: { action: 'activate' } })
  const visit = (await api(`/api/visits?contractId=${contract.body.id}`, { token: owner })).body.rows[0]
  const techs = (await api('/api/technicians', { token: owner })).body.rows
  const tess = techs.find((t: { name: string }) => t.name === 'Tess Okafor')
  const today = (await api('/api/today', { token: await tokenFor(demo.tess) })).body.date
  const moved = await api(`/api/visits/${visit.id}`, { method: 'PATCH', token: owner, body: { technicianId: tess.id, scheduledOn: today, moveReason: 'Test visit today' } })
  if (moved.status !== 200) throw new Error(`could not prepare the visit: ${JSON.stringify(moved.body)}`)
  return { visitId: visit.id as string, featureId: f.body.id as string, customerId: c.body.id as string, reportTo, customerName: `Visit Test ${label}` }
}
