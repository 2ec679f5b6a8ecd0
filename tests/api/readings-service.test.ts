import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { oxygenSaturationMgL, pressureAtAltitudeKPa, STANDARD_PRESSURE_KPA } from '../../shared/utils/water-chemistry'
import { api, demo, tokenFor } from '../helpers/api'
import { waitForMail } from '../helpers/mail'
import { visitForTessToday } from '../helpers/visits'

// One readings service: a technician's record, a customer's own test and the evaluate endpoint
// give the same evaluation of the same reading; oxygen is evaluated at the site's pressure;
// reading errors name the field as the form labels it, in the units the person typed; the
// company's phone number goes with every "call us".

let owner: string
let tess: string
let priya: string
beforeAll(async () => {
  owner = await tokenFor(demo.owner)
  tess = await tokenFor(demo.tess)
  priya = await tokenFor(demo.priya)
})

const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000).toISOString()
type Evaluated = Array<{ parameter: string, status: string, limit: number | null, value: number, reason: string }>
const byParameter = (e: Evaluated) => Object.fromEntries(e.map(p => [p.parameter, { status: p.status, limit: p.limit, value: p.value, reason: p.reason }]))

async function startedPond(label: string) {
  const v = await visitForTessToday(`readings-${label}`)
  expect((await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })).status).toBe(200)
  return v
}

describe('one readings service', () => {
  it('a technician\'s record and the evaluate endpoint give the same evaluation of the same reading', async () => {
    const v = await startedPond('same-tech')
    const values = { temperatureC: 26, pH: 8.2, totalAmmoniaMgL: 2.0, nitriteMgL: 0.3, khMgL: 90, dissolvedOxygenMgL: 6.2, ammoniaBasis: 'N' }
    const id = randomUUID()
    const saved = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [{ id, featureId: v.featureId, takenAt: hoursAgo(1), ...values }] } })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    const stored = saved.body.readings.find((r: { id: string }) => r.id === id)
    const evaluated = await api('/api/water/evaluate', { method: 'POST', token: tess, body: { featureId: v.featureId, reading: values } })
    expect(evaluated.status, JSON.stringify(evaluated.body)).toBe(200)
    expect(byParameter(stored.evaluation)).toEqual(byParameter(evaluated.body.parameters))
    expect(stored.overall).toBe(evaluated.body.overall)
    expect(stored.nh3MgL).toBeCloseTo(evaluated.body.computed.nh3MgL, 12)
    expect(stored.doSaturationPct).toBeCloseTo(evaluated.body.computed.doSaturationPct, 12)
    // The stored reasons speak the company's units (a US company): 26 °C is 78.8 °F.
    expect(stored.evaluation.find((p: { parameter: string }) => p.parameter === 'temperatureC')?.reason ?? '').not.toContain('°C')
  })

  it('a customer\'s own test and the evaluate endpoint give the same evaluation of the same reading', async () => {
    const session = (await api('/api/auth/session', { token: priya })).body
    const feature = (await api(`/api/customers/${session.customerId}`, { token: priya })).body.features[0]
    const values = { temperatureC: 18, pH: 7.9, totalAmmoniaMgL: 0.3, nitriteMgL: 0.05, khMgL: 120, ammoniaBasis: 'N' }
    const own = await api('/api/portal/readings', { method: 'POST', token: priya, body: { id: randomUUID(), featureId: feature.id, takenAt: hoursAgo(1), ...values } })
    expect(own.status, JSON.stringify(own.body)).toBe(201)
    const evaluated = await api('/api/water/evaluate', { method: 'POST', token: owner, body: { featureId: feature.id, reading: values } })
    expect(evaluated.status).toBe(200)
    expect(byParameter(own.body.evaluation)).toEqual(byParameter(evaluated.body.parameters))
    expect(own.body.overall).toBe(evaluated.body.overall)
  })

  it('evaluates oxygen at the site\'s pressure, from its altitude, for every writer', async () => {
    const v = await startedPond('altitude')
    const site = (await api(`/api/features/${v.featureId}`, { token: owner })).body.siteId as string
    expect((await api(`/api/sites/${site}`, { method: 'PATCH', token: owner, body: { altitudeM: 1500 } })).status).toBe(200)
    const values = { temperatureC: 20, dissolvedOxygenMgL: 8 }
    const id = randomUUID()
    const saved = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [{ id, featureId: v.featureId, takenAt: hoursAgo(1), ...values }] } })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    const stored = saved.body.readings.find((r: { id: string }) => r.id === id)
    const evaluated = (await api('/api/water/evaluate', { method: 'POST', token: tess, body: { featureId: v.featureId, reading: values } })).body
    // Standard atmosphere at 1500 m: 101.325 × (1 − 2.25577e−5 · 1500)^5.25588 ≈ 84.56 kPa (C, barometric formula).
    expect(evaluated.inputs.pressureKPa).toBeCloseTo(84.56, 1)
    // Benson & Krause (1984) with the pressure correction of CHECKS.md §2 (C): the saturation at that pressure.
    const expectedPct = 100 * 8 / oxygenSaturationMgL(20, pressureAtAltitudeKPa(1500))
    expect(stored.doSaturationPct).toBeCloseTo(expectedPct, 6)
    expect(evaluated.computed.doSaturationPct).toBeCloseTo(expectedPct, 6)
    // Not the sea-level figure: 8 / 9.092 = 88.0 % at 1 atm (CHECKS.md §2).
    expect(100 * 8 / oxygenSaturationMgL(20, STANDARD_PRESSURE_KPA)).toBeCloseTo(88.0, 1)
    expect(stored.doSaturationPct).toBeGreaterThan(100)
  })
})

describe('reading errors in the words and units of the form', () => {
  it('a US technician typing 120 °F hears that water above 113 °F is not plausible, for the field labelled "Water temperature"', async () => {
    const v = await startedPond('fahrenheit')
    // The form sends SI: 120 °F = (120 − 32) / 1.8 = 48.89 °C (exact definition of the degree Fahrenheit).
    const celsius = (120 - 32) / 1.8
    const bad = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], doses: [], readings: [{ id: randomUUID(), featureId: v.featureId, takenAt: hoursAgo(1), temperatureC: celsius }] } })
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('Water temperature')
    expect(bad.body.message).toContain('113 °F')
    expect(bad.body.message).not.toMatch(/°C|readings\.0\.temperatureC/)
    expect(bad.body.data.fields['readings.0.temperatureC']).toBe('Water temperature above 113 °F is not plausible for a pond')
  })

  it('the evaluate endpoint quotes the limit in the caller\'s units too', async () => {
    const r = await api('/api/water/evaluate', { method: 'POST', token: tess, body: { volumeL: 1000, reading: { temperatureC: 50 } } })
    expect(r.status).toBe(400)
    expect(r.body.data.fields['reading.temperatureC']).toContain('113 °F')
  })
})

describe('the company\'s phone number', () => {
  it('is set in the company settings, validated forgivingly, and refused with a 400 naming the field', async () => {
    const before = (await api('/api/company', { token: owner })).body
    try {
      for (const phone of ['(555) 014-2290', '+44 20 7946 0018', '555.014.2290']) {
        const ok = await api('/api/company', { method: 'PATCH', token: owner, body: { phone } })
        expect(ok.status, phone).toBe(200)
        expect(ok.body.phone).toBe(phone)
      }
      for (const phone of ['call the office', '12', '1'.repeat(16), `+1 ${'5'.repeat(40)}`]) {
        const bad = await api('/api/company', { method: 'PATCH', token: owner, body: { phone } })
        expect(bad.status, phone).toBe(400)
        expect(Object.keys(bad.body.data.fields)).toEqual(['phone'])
        expect(bad.body.message).toMatch(/^Invalid body: phone — /)
      }
      // A PATCH of the phone leaves the rest as it was.
      const after = (await api('/api/company', { token: owner })).body
      expect({ ...after, phone: before.phone }).toEqual(before)
      expect((await api('/api/company', { method: 'PATCH', token: tess, body: { phone: '(555) 014-0000' } })).status).toBe(403)
    }
    finally {
      await api('/api/company', { method: 'PATCH', token: owner, body: { phone: before.phone } })
    }
  })

  async function finishWithAnActReading(label: string) {
    const v = await startedPond(label)
    const record = { checklist: [], doses: [], readings: [{ id: randomUUID(), featureId: v.featureId, takenAt: hoursAgo(1), temperatureC: 24, pH: 8.0, totalAmmoniaMgL: 2.0, ammoniaBasis: 'N' }] }
    const done = await api(`/api/visits/${v.visitId}/finish`, { method: 'POST', token: tess, body: { record } })
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    return waitForMail(m => m.to.includes(v.reportTo))
  }

  it('goes with "call us" in the visit report e-mail; without a number the report promises none', async () => {
    const phone = (await api('/api/company', { token: owner })).body.phone as string
    expect(phone).toBe('(555) 014-2290') // the demo seed's invented number
    const mail = await finishWithAnActReading('phone-report')
    expect(mail.text).toContain(`call us on ${phone}`)
    expect(mail.html).toContain(phone)
    try {
      await api('/api/company', { method: 'PATCH', token: owner, body: { phone: '' } })
      const none = await finishWithAnActReading('no-phone-report')
      expect(none.text).not.toMatch(/call us/i)
      expect(none.text).not.toContain(phone)
    }
    finally {
      await api('/api/company', { method: 'PATCH', token: owner, body: { phone } })
    }
  })

  it('goes with "Call us today" in the portal\'s advice', async () => {
    const session = (await api('/api/auth/session', { token: priya })).body
    const feature = (await api(`/api/customers/${session.customerId}`, { token: priya })).body.features[0]
    const own = await api('/api/portal/readings', { method: 'POST', token: priya, body: { id: randomUUID(), featureId: feature.id, takenAt: hoursAgo(0.5), temperatureC: 24, pH: 8.0, totalAmmoniaMgL: 2.0, ammoniaBasis: 'N' } })
    expect(own.status).toBe(201)
    expect(own.body.advice.callUs).toBe(true)
    expect(own.body.phone).toBe('(555) 014-2290')
    const calls = [own.body.advice.headline, ...own.body.advice.lines.map((l: { text: string }) => l.text)].filter((t: string) => /call us/i.test(t))
    expect(calls.length).toBeGreaterThan(0)
    for (const t of calls) expect(t).toContain('(555) 014-2290')
    const portal = (await api('/api/portal/features', { token: priya })).body.features.find((f: { id: string }) => f.id === feature.id)
    expect(portal.phone).toBe('(555) 014-2290')
    // Back in range, so the alert scan sees the episode end.
    await api('/api/portal/readings', { method: 'POST', token: priya, body: { id: randomUUID(), featureId: feature.id, takenAt: hoursAgo(0.25), temperatureC: 24, pH: 7.4, totalAmmoniaMgL: 0.05, ammoniaBasis: 'N' } })
  })
})
