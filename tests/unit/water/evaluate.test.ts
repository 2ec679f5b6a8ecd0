import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { Parameter, ReadingStatus, WaterReading } from '../../../shared/types/water'
import {
  ACT_WORDS, classifyParameterValue, DEFAULT_PROFILES, evaluateReading, saltGLToChlorideMgL, totalAmmoniaAsN, validateWaterReading, nitrogenToAmmonia, oxygenSaturationMgL, unionizedAmmoniaFraction, WaterInputError,
  worstReadingStatus,
} from '../../../shared/utils/water-chemistry'

const koi = DEFAULT_PROFILES.koi_pond.ranges
const garden = DEFAULT_PROFILES.water_garden.ranges
const pondless = DEFAULT_PROFILES.pondless.ranges

const statusOf = (reading: WaterReading, p: Parameter, ranges = koi) =>
  evaluateReading(reading, ranges).parameters.find(e => e.parameter === p)

describe('evaluateReading: statuses against the koi-pond defaults (table-driven)', () => {
  const cases: Array<[string, WaterReading, Parameter, ReadingStatus, number | null]> = [
    ['pH 7.6 ok', { pH: 7.6 }, 'pH', 'ok', null],
    ['pH 7.0 ok (bounds are strict)', { pH: 7.0 }, 'pH', 'ok', null],
    ['pH 6.8 watch', { pH: 6.8 }, 'pH', 'watch', 7.0],
    ['pH 6.2 act', { pH: 6.2 }, 'pH', 'act', 6.5],
    ['pH 8.7 watch', { pH: 8.7 }, 'pH', 'watch', 8.5],
    ['pH 9.6 act', { pH: 9.6 }, 'pH', 'act', 9.5],
    ['KH 110 ok', { khMgL: 110 }, 'khMgL', 'ok', null],
    ['KH 80 watch', { khMgL: 80 }, 'khMgL', 'watch', 100],
    ['KH 15 act', { khMgL: 15 }, 'khMgL', 'act', 20],
    ['TAN 0.2 ok', { totalAmmoniaMgL: 0.2 }, 'totalAmmoniaMgL', 'ok', null],
    ['TAN 0.5 watch', { totalAmmoniaMgL: 0.5 }, 'totalAmmoniaMgL', 'watch', 0.25],
    ['TAN 2 act', { totalAmmoniaMgL: 2 }, 'totalAmmoniaMgL', 'act', 1.0],
    ['nitrite 0 ok', { nitriteMgL: 0 }, 'nitriteMgL', 'ok', null],
    ['nitrite 0.2 watch', { nitriteMgL: 0.2 }, 'nitriteMgL', 'watch', 0.1],
    ['nitrite 0.3 act', { nitriteMgL: 0.3 }, 'nitriteMgL', 'act', 0.25],
    ['nitrate 30 watch', { nitrateMgL: 30 }, 'nitrateMgL', 'watch', 20],
    ['nitrate 60 act', { nitrateMgL: 60 }, 'nitrateMgL', 'act', 50],
    ['DO 7 ok', { dissolvedOxygenMgL: 7 }, 'dissolvedOxygenMgL', 'ok', null],
    ['DO 5.5 watch', { dissolvedOxygenMgL: 5.5 }, 'dissolvedOxygenMgL', 'watch', 6],
    ['DO 4 act', { dissolvedOxygenMgL: 4 }, 'dissolvedOxygenMgL', 'act', 5],
    ['chlorine 0 ok', { chlorineMgL: 0 }, 'chlorineMgL', 'ok', null],
    ['chlorine 0.02 act', { chlorineMgL: 0.02 }, 'chlorineMgL', 'act', 0],
    ['temperature 29 watch', { temperatureC: 29 }, 'temperatureC', 'watch', 27],
    ['temperature 32 act', { temperatureC: 32 }, 'temperatureC', 'act', 31],
    ['salt 2 ok', { saltGL: 2 }, 'saltGL', 'ok', null],
    ['salt 4 watch', { saltGL: 4 }, 'saltGL', 'watch', 3],
    ['salt 6 act', { saltGL: 6 }, 'saltGL', 'act', 5],
    ['phosphate 1 watch', { phosphateMgL: 1 }, 'phosphateMgL', 'watch', 0.5],
  ]
  for (const [title, reading, p, status, limit] of cases) {
    it(title, () => {
      const e = statusOf(reading, p)!
      expect(e.status).toBe(status)
      expect(e.limit).toBe(limit)
      expect(e.reason.length).toBeGreaterThan(10)
    })
  }
})

describe('plain-words reasons', () => {
  it('ok, watch and act read as one line', () => {
    expect(statusOf({ pH: 7.6 }, 'pH')!.reason).toBe('pH 7.6 is within 7.0–8.5')
    expect(statusOf({ pH: 6.2 }, 'pH')!.reason).toBe('pH 6.2 is below 6.5: the water is turning acidic — check KH — act today')
    expect(statusOf({ pH: 6.8 }, 'pH')!.reason).toBe('pH 6.8 is below 7.0: pH is drifting down — check KH')
    expect(statusOf({ chlorineMgL: 0 }, 'chlorineMgL')!.reason).toBe('Chlorine: none detected')
    expect(statusOf({ nitriteMgL: 0.05 }, 'nitriteMgL')!.reason).toBe('Nitrite 0.05 mg/L is at or below 0.1')
  })
  it('un-ionized ammonia over 0.05 mg/L is "harmful to fish — act today"', () => {
    // TAN 1.5 mg/L as N at pH 8.0, 24 °C → NH3 = 1.5 × 0.0502 × 1.2159 ≈ 0.0915 mg/L
    const e = statusOf({ totalAmmoniaMgL: 1.5, pH: 8.0, temperatureC: 24 }, 'nh3MgL')!
    expect(e.status).toBe('act')
    expect(e.limit).toBe(0.05)
    expect(e.reason).toMatch(/^Un-ionized ammonia 0\.09\d* mg\/L is above 0\.05: harmful to fish — act today$/)
  })
})

describe('reasons in the company\'s units (NIST Handbook 44: °F = °C × 9/5 + 32)', () => {
  const reason = (reading: WaterReading, p: Parameter, unitSystem: 'us' | 'metric', ranges = koi) =>
    evaluateReading(reading, ranges, { unitSystem }).parameters.find(e => e.parameter === p)!.reason
  it('temperature and its limit in °F for a US company, °C for a metric one', () => {
    expect(reason({ temperatureC: 29 }, 'temperatureC', 'us')).toBe('Water temperature 84.2 °F is above 80.6: warm water holds less oxygen — add aeration and shade')
    expect(reason({ temperatureC: 29 }, 'temperatureC', 'metric')).toBe('Water temperature 29 °C is above 27: warm water holds less oxygen — add aeration and shade')
    expect(reason({ temperatureC: 20 }, 'temperatureC', 'us')).toBe('Water temperature 68 °F is at or below 80.6')
    expect(reason({ temperatureC: 32 }, 'temperatureC', 'us')).toBe('Water temperature 89.6 °F is above 87.8: too warm for fish — aerate, shade and feed less — act today')
  })
  it('salt in percent for a US company, g/L for a metric one', () => {
    expect(reason({ saltGL: 4 }, 'saltGL', 'us')).toBe('Salt 0.4 % is above 0.3: more salt than a standing pond level — hard on plants')
    expect(reason({ saltGL: 4 }, 'saltGL', 'metric')).toBe('Salt 4 g/L is above 3: more salt than a standing pond level — hard on plants')
  })
  it('the SRAC 462 chloride note in either system (a concentration reads the same)', () => {
    for (const unitSystem of ['us', 'metric'] as const) {
      expect(reason({ nitriteMgL: 0.08, saltGL: 0 }, 'nitriteMgL', unitSystem)).toBe('Nitrite 0.08 mg/L with chloride 0 mg/L is below 10 × nitrite, so nitrite is more toxic to fish — add pond salt or change some water (SRAC 462)')
    }
  })
  it('a range without words of its own still says where the value is, and act says so', () => {
    const ranges = { ghMgL: { watchBelow: 50, actBelow: 20, source: 'x', sourceKind: 'common practice' as const } }
    expect(reason({ ghMgL: 40 }, 'ghMgL', 'us', ranges)).toBe('GH 40 mg/L is below 50: below the range set for this feature')
    expect(reason({ ghMgL: 10 }, 'ghMgL', 'us', ranges)).toBe('GH 10 mg/L is below 20: below the range set for this feature — act today')
    expect(reason({ ghMgL: 60 }, 'ghMgL', 'us', { ghMgL: { source: 'x', sourceKind: 'common practice' } })).toBe('GH 60 mg/L: no limits set')
    expect(reason({ ghMgL: 60 }, 'ghMgL', 'us', { ghMgL: { watchBelow: 50, source: 'x', sourceKind: 'common practice' } })).toBe('GH 60 mg/L is at or above 50')
  })
  it('watch words for watch, act words for act, for every parameter the profiles rate', () => {
    const act = /act today$/
    for (const profile of Object.values(DEFAULT_PROFILES)) {
      for (const [p, r] of Object.entries(profile.ranges) as Array<[Parameter, NonNullable<(typeof koi)[Parameter]>]>) {
        const probe = (v: number) => classifyParameterValue(p, v, r, 'us')
        if (r.actAbove !== undefined) expect(probe(r.actAbove + 1).reason).toMatch(act)
        if (r.actBelow !== undefined && r.actBelow > 0) expect(probe(r.actBelow - 0.01).reason).toMatch(act)
        if (r.watchAbove !== undefined && (r.actAbove === undefined || r.actAbove > r.watchAbove + 1e-6)) {
          const v = r.actAbove === undefined ? r.watchAbove + 1 : (r.watchAbove + r.actAbove) / 2
          expect(probe(v).status).toBe('watch')
          expect(probe(v).reason).not.toMatch(ACT_WORDS)
        }
        if (r.watchBelow !== undefined && (r.actBelow === undefined || r.actBelow < r.watchBelow)) {
          const v = r.actBelow === undefined ? r.watchBelow / 2 : (r.watchBelow + r.actBelow) / 2
          expect(probe(v).status).toBe('watch')
          expect(probe(v).reason).not.toMatch(ACT_WORDS)
        }
      }
    }
  })
  it('classifyParameterValue defaults to metric', () => {
    expect(classifyParameterValue('temperatureC', 29, koi.temperatureC!).reason).toMatch(/^Water temperature 29 °C/)
  })
})

describe('computed values', () => {
  it('NH3 as N and as NH3 when TAN, pH and temperature are present (Emerson et al. 1975)', () => {
    const ev = evaluateReading({ totalAmmoniaMgL: 1.0, pH: 8.0, temperatureC: 24 }, koi)
    expect(ev.computed.nh3Fraction).toBeCloseTo(unionizedAmmoniaFraction(8.0, 24), 12)
    expect(Math.abs(ev.computed.nh3AsNMgL! - 0.0502)).toBeLessThanOrEqual(0.0001) // FA16 worked example (P)
    expect(ev.computed.nh3MgL).toBeCloseTo(nitrogenToAmmonia(ev.computed.nh3AsNMgL!), 12)
  })
  it('no NH3 without pH or temperature', () => {
    expect(evaluateReading({ totalAmmoniaMgL: 1.0, pH: 8.0 }, koi).computed.nh3MgL).toBeNull()
    expect(evaluateReading({ totalAmmoniaMgL: 1.0, temperatureC: 20 }, koi).computed.nh3MgL).toBeNull()
    expect(statusOf({ totalAmmoniaMgL: 1.0, pH: 8.0 }, 'nh3MgL')).toBeUndefined()
  })
  it('same water reported as N and as NH3 gives the same computed NH3 and TAN status', () => {
    const asN = evaluateReading({ totalAmmoniaMgL: 0.6, pH: 7.8, temperatureC: 22 }, koi)
    const asNH3 = evaluateReading({ totalAmmoniaMgL: nitrogenToAmmonia(0.6), ammoniaBasis: 'NH3', pH: 7.8, temperatureC: 22 }, koi)
    expect(asNH3.computed.nh3MgL).toBeCloseTo(asN.computed.nh3MgL!, 12)
    expect(asNH3.computed.nh3AsNMgL).toBeCloseTo(asN.computed.nh3AsNMgL!, 12)
    const tan = (ev: typeof asN) => ev.parameters.find(e => e.parameter === 'totalAmmoniaMgL')!
    expect(tan(asNH3).value).toBeCloseTo(0.6, 12)
    expect(tan(asNH3).status).toBe(tan(asN).status)
  })
  it('DO saturation and percent, with pressure from context (Benson & Krause 1984): 7.0 mg/L at 25 °C → 84.7 %', () => {
    const ev = evaluateReading({ dissolvedOxygenMgL: 7.0, temperatureC: 25 }, koi)
    expect(ev.computed.doSaturationMgL).toBeCloseTo(oxygenSaturationMgL(25), 12)
    expect(ev.computed.doSaturationPct).toBeCloseTo(84.7, 1)
    const high = evaluateReading({ dissolvedOxygenMgL: 7.0, temperatureC: 25 }, koi, { pressureKPa: 85 })
    expect(high.computed.doSaturationMgL).toBeCloseTo(oxygenSaturationMgL(25, 85), 12)
    expect(high.computed.doSaturationPct!).toBeGreaterThan(ev.computed.doSaturationPct!)
  })
  it('DO saturation below 70 % is watch', () => {
    const e = statusOf({ dissolvedOxygenMgL: 5.2, temperatureC: 28 }, 'doSaturationPct')!
    expect(e.value).toBeLessThan(70)
    expect(e.status).toBe('watch')
  })
})

describe('nitrite:chloride rule (Durborow, Crosby & Brunson, SRAC 462, P: chloride ≥ 10 × nitrite)', () => {
  it('raises an in-range nitrite to watch when chloride < 10 × nitrite', () => {
    const e = statusOf({ nitriteMgL: 0.08, saltGL: 0 }, 'nitriteMgL')!
    expect(e.status).toBe('watch')
    expect(e.reason).toMatch(/10 × nitrite/)
    expect(e.reason).toMatch(/SRAC 462/)
  })
  it('no change when chloride is enough (0.1 g/L salt = 60.7 mg/L chloride ≥ 10 × 0.08)', () => {
    expect(statusOf({ nitriteMgL: 0.08, saltGL: 0.1 }, 'nitriteMgL')!.status).toBe('ok')
  })
  it('boundary: chloride just under and just over 10 × nitrite', () => {
    const saltFor = (chlorideMgL: number) => chlorideMgL / 606.61
    expect(statusOf({ nitriteMgL: 0.05, saltGL: saltFor(0.49) }, 'nitriteMgL')!.status).toBe('watch')
    expect(statusOf({ nitriteMgL: 0.05, saltGL: saltFor(0.51) }, 'nitriteMgL')!.status).toBe('ok')
  })
  it('keeps act when nitrite is already over its act limit, and adds the chloride note', () => {
    const e = statusOf({ nitriteMgL: 0.5, saltGL: 0 }, 'nitriteMgL')!
    expect(e.status).toBe('act')
    expect(e.limit).toBe(0.25)
    expect(e.reason).toMatch(/10 × nitrite/)
  })
  it('not applied when salt is unknown or nitrite is zero', () => {
    expect(statusOf({ nitriteMgL: 0.08 }, 'nitriteMgL')!.status).toBe('ok')
    expect(statusOf({ nitriteMgL: 0, saltGL: 0 }, 'nitriteMgL')!.status).toBe('ok')
  })
  it('applies even when the profile has no nitrite range', () => {
    const e = statusOf({ nitriteMgL: 0.08, saltGL: 0 }, 'nitriteMgL', pondless)!
    expect(e.status).toBe('watch')
  })
})

describe('overall = worst status', () => {
  it('act beats watch beats ok', () => {
    expect(evaluateReading({ pH: 7.6, khMgL: 120 }, koi).overall).toBe('ok')
    expect(evaluateReading({ pH: 7.6, khMgL: 80 }, koi).overall).toBe('watch')
    expect(evaluateReading({ pH: 7.6, khMgL: 80, chlorineMgL: 0.1 }, koi).overall).toBe('act')
    expect(evaluateReading({}, koi)).toEqual({
      computed: { nh3MgL: null, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: null },
      parameters: [],
      overall: 'ok',
    })
    expect(worstReadingStatus(['ok', 'act', 'watch'])).toBe('act')
    expect(worstReadingStatus([])).toBe('ok')
  })
  it('profiles differ: pH 6.8 is watch for koi, ok for a water garden', () => {
    expect(statusOf({ pH: 6.8 }, 'pH', koi)!.status).toBe('watch')
    expect(statusOf({ pH: 6.8 }, 'pH', garden)!.status).toBe('ok')
  })
  it('property: overall is the worst parameter status, never NaN', () => {
    const opt = (a: fc.Arbitrary<number>) => fc.option(a, { nil: undefined })
    fc.assert(fc.property(
      opt(fc.double({ min: 0, max: 14, noNaN: true })), opt(fc.double({ min: 0, max: 45, noNaN: true })),
      opt(fc.double({ min: 0, max: 10, noNaN: true })), opt(fc.double({ min: 0, max: 20, noNaN: true })),
      opt(fc.double({ min: 0, max: 5, noNaN: true })), opt(fc.double({ min: 0, max: 10, noNaN: true })),
      (pH, temperatureC, totalAmmoniaMgL, dissolvedOxygenMgL, nitriteMgL, saltGL) => {
        const ev = evaluateReading({ pH, temperatureC, totalAmmoniaMgL, dissolvedOxygenMgL, nitriteMgL, saltGL }, koi)
        expect(ev.overall).toBe(worstReadingStatus(ev.parameters.map(e => e.status)))
        for (const e of ev.parameters) expect(Number.isFinite(e.value)).toBe(true)
        for (const v of Object.values(ev.computed)) if (v !== null) expect(Number.isFinite(v)).toBe(true)
      },
    ))
  })
})

describe('input range (WaterInputError with the field name)', () => {
  const field = (reading: WaterReading, ctx?: { pressureKPa?: number }) => {
    try { evaluateReading(reading, koi, ctx) } catch (e) { expect(e).toBeInstanceOf(WaterInputError); return (e as WaterInputError).field }
    throw new Error('did not throw')
  }
  it('names the field', () => {
    expect(field({ pH: 14.5 })).toBe('pH')
    expect(field({ temperatureC: -2 })).toBe('temperatureC')
    expect(field({ temperatureC: 60 })).toBe('temperatureC')
    expect(field({ totalAmmoniaMgL: -0.1 })).toBe('totalAmmoniaMgL')
    expect(field({ nitriteMgL: Number.NaN })).toBe('nitriteMgL')
    expect(field({ khMgL: -5 })).toBe('khMgL')
    expect(field({ saltGL: Number.POSITIVE_INFINITY })).toBe('saltGL')
    expect(field({ ammoniaBasis: 'NO3' as never })).toBe('ammoniaBasis')
    expect(field({ dissolvedOxygenMgL: 7, temperatureC: 20 }, { pressureKPa: 20 })).toBe('pressureKPa')
  })
  it('null values are simply not measured', () => {
    expect(evaluateReading({ pH: null, khMgL: null }, koi).parameters).toEqual([])
  })
})

describe('what each reason says at each level (the product\'s wording; common practice, no source)', () => {
  const reason = (p: Parameter, v: number, r: Record<string, number>) => classifyParameterValue(p, v, { ...r, source: 'x', sourceKind: 'common practice' }, 'metric').reason
  it.each([
    ['temperatureC', 8, { watchBelow: 10, actBelow: 4 }, 'cold water — feed less'],
    ['temperatureC', 2, { watchBelow: 10, actBelow: 4 }, 'very cold — stop feeding and keep a hole in any ice — act today'],
    ['temperatureC', 28, { watchAbove: 27, actAbove: 31 }, 'warm water holds less oxygen — add aeration and shade'],
    ['temperatureC', 32, { watchAbove: 27, actAbove: 31 }, 'too warm for fish — aerate, shade and feed less — act today'],
    ['pH', 6.8, { watchBelow: 7, actBelow: 6.5 }, 'pH is drifting down — check KH'],
    ['pH', 6.2, { watchBelow: 7, actBelow: 6.5 }, 'the water is turning acidic — check KH — act today'],
    ['pH', 8.7, { watchAbove: 8.5, actAbove: 9.5 }, 'the water is quite alkaline — ammonia is more toxic as pH rises'],
    ['pH', 9.7, { watchAbove: 8.5, actAbove: 9.5 }, 'the water is strongly alkaline — look for fresh mortar or concrete and heavy algae — act today'],
    ['totalAmmoniaMgL', 0.5, { watchAbove: 0.25, actAbove: 1 }, 'ammonia is building up — feed less and check the filter'],
    ['totalAmmoniaMgL', 2, { watchAbove: 0.25, actAbove: 1 }, 'ammonia is high — change some water and feed less — act today'],
    ['nh3MgL', 0.03, { watchAbove: 0.02, actAbove: 0.05 }, 'stressful to fish over time — feed less and check the filter'],
    ['nh3MgL', 0.1, { watchAbove: 0.02, actAbove: 0.05 }, 'harmful to fish — act today'],
    ['nitriteMgL', 0.2, { watchAbove: 0.1, actAbove: 0.25 }, 'the filter is not keeping up — feed less and retest'],
    ['nitriteMgL', 0.5, { watchAbove: 0.1, actAbove: 0.25 }, 'harmful to fish — change some water — act today'],
    ['nitrateMgL', 30, { watchAbove: 20, actAbove: 50 }, 'feeds algae — plan a partial water change'],
    ['nitrateMgL', 60, { watchAbove: 20, actAbove: 50 }, 'high — change some water and review feeding and stocking — act today'],
    ['khMgL', 80, { watchBelow: 100, actBelow: 20 }, 'the buffer is getting low — pH may swing'],
    ['khMgL', 10, { watchBelow: 100, actBelow: 20 }, 'the water has almost no buffer — pH can crash — act today'],
    ['dissolvedOxygenMgL', 5.5, { watchBelow: 6, actBelow: 5 }, 'oxygen is getting low — add aeration'],
    ['dissolvedOxygenMgL', 4, { watchBelow: 6, actBelow: 5 }, 'fish may struggle for oxygen — aerate day and night — act today'],
    ['doSaturationPct', 60, { watchBelow: 70, actBelow: 50 }, 'the water holds less oxygen than it could — add aeration or water movement'],
    ['doSaturationPct', 40, { watchBelow: 70, actBelow: 50 }, 'very little oxygen for this temperature — aerate day and night — act today'],
    ['saltGL', 4, { watchAbove: 3, actAbove: 5 }, 'more salt than a standing pond level — hard on plants'],
    ['saltGL', 6, { watchAbove: 3, actAbove: 5 }, 'as strong as a short treatment bath — too much to leave in the pond; change some water — act today'],
    ['chlorineMgL', 0.01, { watchAbove: 0 }, 'chlorine from tap water — add dechlorinator'],
    ['chlorineMgL', 0.01, { actAbove: 0 }, 'chlorine is toxic to fish — add dechlorinator for the whole pond — act today'],
    ['phosphateMgL', 1, { watchAbove: 0.5, actAbove: 2 }, 'feeds algae — check feeding and plant cover'],
    ['phosphateMgL', 3, { watchAbove: 0.5, actAbove: 2 }, 'strongly feeds algae — check feeding, plant cover and fertiliser run-off — act today'],
    ['ghMgL', 400, { watchAbove: 300 }, 'above the range set for this feature'],
    ['pH', 7.2, { watchAbove: 9 }, null],
  ] as const)('%s %d', (p, v, r, words) => {
    const text = reason(p, v, r)
    if (words === null) expect(text).toBe('pH 7.2 is at or below 9.0')
    else expect(text.endsWith(`: ${words}`), text).toBe(true)
  })
  it('the SRAC 462 note takes the nitrite\'s place in reading order when nitrite has no range, and replaces an in-range nitrite', () => {
    const pondless = DEFAULT_PROFILES.pondless.ranges
    const e = evaluateReading({ pH: 7.5, khMgL: 100, nitriteMgL: 0.08, saltGL: 0 }, pondless)
    expect(e.parameters.map(p => p.parameter)).toEqual(['pH', 'nitriteMgL', 'khMgL', 'saltGL'])
    const n = e.parameters[1]!
    expect(n).toMatchObject({ status: 'watch', value: 0.08, limit: 0 })
    const inRange = evaluateReading({ nitriteMgL: 0.08, saltGL: 0.001 }, koi).parameters.filter(p => p.parameter === 'nitriteMgL')
    expect(inRange).toHaveLength(1)
    expect(inRange[0]!.limit).toBeCloseTo(saltGLToChlorideMgL(0.001) / 10, 12)
    expect(inRange[0]!.reason).toBe('Nitrite 0.08 mg/L with chloride 1 mg/L is below 10 × nitrite, so nitrite is more toxic to fish — add pond salt or change some water (SRAC 462)')
    const watch = evaluateReading({ nitriteMgL: 0.2, saltGL: 0 }, koi).parameters.find(p => p.parameter === 'nitriteMgL')!
    expect(watch.reason).toBe('Nitrite 0.2 mg/L is above 0.1: the filter is not keeping up — feed less and retest; chloride 0 mg/L is below 10 × nitrite, so nitrite is more toxic to fish — add pond salt or change some water (SRAC 462)')
    expect(watch.limit).toBe(0.1)
  })
  it('unknown values and bad input', () => {
    expect(() => evaluateReading(null as never, koi)).toThrow('reading is required')
    expect(() => validateWaterReading('x' as never)).toThrow(WaterInputError)
    expect(() => evaluateReading({ ammoniaBasis: 'NO3' as never }, koi)).toThrow('ammoniaBasis must be "N" or "NH3"')
    expect(validateWaterReading({ waterLevelMm: -12, ammoniaBasis: 'NH3', totalAmmoniaMgL: 1 })).toEqual({ waterLevelMm: -12, totalAmmoniaMgL: 1 })
    expect(() => validateWaterReading({ waterLevelMm: Number.NaN })).toThrow(WaterInputError)
    expect(totalAmmoniaAsN({})).toBeNull()
    expect(totalAmmoniaAsN({ totalAmmoniaMgL: nitrogenToAmmonia(0.5), ammoniaBasis: 'NH3' })).toBeCloseTo(0.5, 12)
    expect(totalAmmoniaAsN({ totalAmmoniaMgL: 0.5, ammoniaBasis: 'N' })).toBe(0.5)
    expect(evaluateReading({ pH: 7.5 }, null as never).parameters).toEqual([])
  })
  it('worst status of nothing is ok', () => {
    expect(worstReadingStatus([])).toBe('ok')
    expect(worstReadingStatus(['watch', 'ok'])).toBe('watch')
    expect(worstReadingStatus(['act', 'watch'])).toBe('act')
  })
})
