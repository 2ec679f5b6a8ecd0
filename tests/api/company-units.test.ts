import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { UnitSystem } from '../../shared/utils/water/format'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { waitForMail } from '../helpers/mail'
import { pdfText } from '../helpers/pdf-text'
import { foreignUnits, foreignUnitsIn, stringsIn } from '../helpers/units-scan'
import { visitForTessToday } from '../helpers/visits'

// For a US company and for a metric one, every sentence the evaluate endpoint, the visit report
// e-mail, an alert e-mail and the invoice PDF produce carries only that system's units.

let owner: string
let tess: string
let companyUnits: UnitSystem
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  tess = await tokenFor(demo.tess)
  companyUnits = (await api('/api/company', { token: owner })).body.companyUnitSystem
})
afterAll(async () => {
  await api('/api/company', { method: 'PATCH', token: owner, body: { unitSystem: companyUnits } })
})

const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000).toISOString()
/** Keys of an API response that hold names for programs, not words for people. */
const NOT_SENTENCES = new Set(['key', 'unit', 'parameter', 'status', 'overall', 'kind', 'id', 'featureId', 'inputs', 'feature', 'unitSystem'])
const DEGREES: Record<UnitSystem, string> = { us: '°F', metric: '°C' }

async function useUnits(system: UnitSystem) {
  const r = await api('/api/company', { method: 'PATCH', token: owner, body: { unitSystem: system } })
  expect(r.status).toBe(200)
  // The technician has no unit preference of their own: they read in the company's units.
  expect((await api('/api/company', { token: tess })).body.unitSystem).toBe(system)
}

for (const system of ['us', 'metric'] as const) {
  describe(`a ${system === 'us' ? 'US' : 'metric'} company`, () => {
    beforeAll(async () => {
      await useUnits(system)
    })

    it('the evaluate endpoint: reasons, dosing lines and cautions', async () => {
      // The scenario of issue 14: 26 °C, pH 8.2, TAN 2.0, KH 90, plus low oxygen, nitrite, salt and a top-up.
      const r = await api('/api/water/evaluate', {
        method: 'POST', token: tess,
        body: {
          volumeL: 5678, kind: 'koi_pond', topUpLitres: 400, dechlorinatorRate: { amount: 5, unit: 'mL', perLitres: 200 },
          reading: { temperatureC: 26, pH: 8.2, totalAmmoniaMgL: 2.0, khMgL: 90, nitriteMgL: 0.5, saltGL: 0.5, dissolvedOxygenMgL: 5.5 },
        },
      })
      expect(r.status, JSON.stringify(r.body)).toBe(200)
      const sentences = stringsIn({ parameters: r.body.parameters, suggestions: r.body.suggestions, cautions: r.body.cautions }, NOT_SENTENCES)
      expect(sentences.join('\n')).toContain(DEGREES[system])
      expect(foreignUnitsIn(sentences, system)).toEqual([])
    })

    it('an alert e-mail and the visit report e-mail', async () => {
      const v = await visitForTessToday(`units-${system}`)
      await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
      await api('/api/alerts/scan', { method: 'POST', token: owner })
      // 31.5 °C is above the koi pond's act level of 31 °C (common practice, profiles.ts); TAN 2.0 above its act level of 1.0.
      const reading = { id: randomUUID(), featureId: v.featureId, takenAt: hoursAgo(1), ammoniaBasis: 'N', temperatureC: 31.5, pH: 8.0, totalAmmoniaMgL: 2.0, khMgL: 60, waterLevelMm: -20 }
      const doses = [
        { id: randomUUID(), featureId: v.featureId, productName: 'Top-up water', isTopUp: true, amount: 200, unit: 'L', dosedAt: hoursAgo(1) },
        { id: randomUUID(), featureId: v.featureId, productName: 'Sodium bicarbonate (KH buffer)', amount: 250, unit: 'g', dosedAt: hoursAgo(1) },
        { id: randomUUID(), featureId: v.featureId, productName: 'Dechlorinator', amount: 10, unit: 'mL', dosedAt: hoursAgo(1) },
      ]
      const saved = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], readings: [reading], doses } })
      expect(saved.status, JSON.stringify(saved.body)).toBe(200)
      await api('/api/alerts/scan', { method: 'POST', token: owner })
      const customerAlert = await waitForMail(m => m.to.includes(v.reportTo) && /attention today/.test(m.subject))
      expect(customerAlert.text).toContain(DEGREES[system])
      expect(foreignUnits(customerAlert.text, system)).toEqual([])
      const alertIds = ((await api(`/api/alerts?featureId=${v.featureId}&status=active&pageSize=100`, { token: owner })).body.rows as Array<{ id: string }>).map(a => a.id)
      const ownerAlert = await waitForMail(m => m.to.includes(demo.owner) && alertIds.some(id => m.text.includes(`retest=${id}`)))
      expect(ownerAlert.text).toContain(DEGREES[system])
      expect(foreignUnits(ownerAlert.text, system)).toEqual([])

      const done = await api(`/api/visits/${v.visitId}/finish`, { method: 'POST', token: tess, body: {} })
      expect(done.status).toBe(200)
      const report = await waitForMail(m => m.to.includes(v.reportTo) && /report/.test(m.subject))
      expect(report.text).toContain(DEGREES[system])
      expect(foreignUnits(report.text, system)).toEqual([])
      expect(foreignUnits(report.html.replace(/<[^>]+>/g, '\n'), system)).toEqual([])
    })

    it('the invoice PDF', async () => {
      const list = (await api('/api/invoices?pageSize=5', { token: owner })).body.rows as Array<{ id: string }>
      expect(list.length).toBeGreaterThan(0)
      for (const inv of list) {
        const res = await fetch(`${baseUrl()}/api/invoices/${inv.id}/pdf`, { headers: { authorization: `Bearer ${owner}` } })
        expect(res.status).toBe(200)
        const text = pdfText(Buffer.from(await res.arrayBuffer()))
        expect(text.length).toBeGreaterThan(50)
        expect(foreignUnits(text, system)).toEqual([])
      }
    })
  })
}
