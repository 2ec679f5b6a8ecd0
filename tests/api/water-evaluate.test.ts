import { describe, expect, it } from 'vitest'
import { api, demo, tokenFor } from '../helpers/api'

describe('POST /api/water/evaluate', () => {
  it('computes NH3, DO saturation and statuses for a volume, with the inputs used', async () => {
    const token = await tokenFor(demo.tess)
    const r = await api('/api/water/evaluate', {
      method: 'POST', token,
      body: { volumeL: 10_000, kind: 'koi_pond', reading: { temperatureC: 25, pH: 7.6, dissolvedOxygenMgL: 7.0, totalAmmoniaMgL: 0.1, khMgL: 60 } },
    })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    // CHECKS.md §2 (Benson & Krause 1984, as used by USGS): 7.0 mg/L at 25 °C, 1 atm → 84.7 % saturation.
    expect(r.body.computed.doSaturationPct).toBeCloseTo(84.7, 1)
    expect(r.body.inputs.volumeL).toBe(10_000)
    const kh = r.body.parameters.find((p: { parameter: string }) => p.parameter === 'khMgL')
    expect(kh.status).toBe('watch')
    const bicarbonate = r.body.suggestions.find((s: { key: string }) => s.key === 'kh_buffer')
    expect(bicarbonate.unit).toBe('g')
    expect(bicarbonate.amount).toBeGreaterThan(0)
    expect(r.body.cautions.join(' ')).toMatch(/label/)
  })

  it('uses the feature\'s volume and its site altitude for oxygen', async () => {
    const token = await tokenFor(demo.owner)
    const feature = (await api('/api/features?q=Whitcombe', { token })).body.rows[0]
    const r = await api('/api/water/evaluate', { method: 'POST', token, body: { featureId: feature.id, reading: { temperatureC: 20, dissolvedOxygenMgL: 8 } } })
    expect(r.status).toBe(200)
    expect(r.body.inputs.volumeL).toBeCloseTo(feature.volumeL, 6)
    expect(r.body.inputs.altitudeM).toBeGreaterThan(0)
    expect(r.body.inputs.pressureKPa).toBeLessThan(101.325)
    // Lower pressure at altitude → saturation below the sea-level 9.092 mg/L (CHECKS.md §2).
    expect(r.body.computed.doSaturationMgL).toBeLessThan(9.092)
  })

  it('suggests dechlorinator for a top-up at the label rate given', async () => {
    const token = await tokenFor(demo.tess)
    const r = await api('/api/water/evaluate', {
      method: 'POST', token,
      body: { volumeL: 5000, reading: { pH: 7.5 }, topUpLitres: 400, dechlorinatorRate: { amount: 5, unit: 'mL', perLitres: 200 } },
    })
    const d = r.body.suggestions.find((s: { key: string }) => s.key === 'dechlorinator')
    expect(d.amount).toBeCloseTo(10, 9)
    expect(d.unit).toBe('mL')
  })

  it('rejects bad input with 400 and a message naming the field', async () => {
    const token = await tokenFor(demo.tess)
    // The message names a water value as the form labels it (the catalogue's label), other fields by their path.
    const cases: Array<[unknown, string, string]> = [
      [{ volumeL: 1000, reading: { pH: 15 } }, 'reading.pH', 'pH'],
      [{ volumeL: 1000, reading: { temperatureC: -3 } }, 'reading.temperatureC', 'Water temperature'],
      [{ volumeL: -5, reading: {} }, 'volumeL', 'volumeL'],
      [{ reading: { pH: 7 } }, 'volumeL', 'volumeL'],
      [{ volumeL: 1000, reading: { totalAmmoniaMgL: 'lots' } }, 'reading.totalAmmoniaMgL', 'Total ammonia (TAN)'],
      [{ volumeL: 1000, reading: { ammoniaBasis: 'NO3' } }, 'reading.ammoniaBasis', 'reading.ammoniaBasis'],
      [{ featureId: 'not-an-id', reading: {} }, 'featureId', 'featureId'],
    ]
    for (const [body, field, name] of cases) {
      const r = await api('/api/water/evaluate', { method: 'POST', token, body })
      expect(r.status, JSON.stringify(body)).toBe(400)
      expect(Object.keys(r.body.data.fields), JSON.stringify(body)).toContain(field)
      expect(r.body.message).toContain(`Invalid body: ${name} — `)
      expect(r.body.message).not.toMatch(/reading\.(?!ammoniaBasis)\w/)
    }
  })

  it('an unknown feature is 404', async () => {
    const token = await tokenFor(demo.tess)
    const r = await api('/api/water/evaluate', { method: 'POST', token, body: { featureId: '00000000-0000-4000-8000-000000000000', reading: {} } })
    expect(r.status).toBe(404)
  })
})
