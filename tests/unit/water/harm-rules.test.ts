import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { DosingSuggestion, RangeTable, WaterReading } from '../../../shared/types/water'
import { adviceFor } from '../../../shared/utils/advice'
import { homeDose } from '../../../shared/utils/home-dosing'
import {
  ACT_WORDS, DEFAULT_PROFILES, dosingSuggestions, evaluateReading, fahrenheitToCelsius, MAX_WATER_CHANGE_FRACTION, NH3_PER_N,
  unionizedAmmoniaFraction, usGallonsToLitres,
} from '../../../shared/utils/water-chemistry'
import {
  CHEMICAL_CAUTIONS, DEFAULT_NH3_WATCH_MGL, FEED_LIGHTLY_BELOW_C, MEDICATION_CAUTIONS, SAFETY, STOP_FEEDING_BELOW_C, WARM_WATER_C,
} from '../../../shared/utils/water/rules'
import { foreignUnitsIn, stringsIn } from '../../helpers/units-scan'

// "Advice that does no harm" (PRODUCT.md): first things first — oxygen, then ammonia and nitrite,
// then pH stability, then KH, then looks. Sources are named beside each check; the rest is the
// trade's common practice (no source), tested as the product's stated rule.
const koi = DEFAULT_PROFILES.koi_pond.ranges
const SI_KEYS = new Set(['key', 'unit', 'inputs'])
const systems = ['metric', 'us'] as const
const keys = (l: DosingSuggestion[]) => l.map(s => s.key)
const find = (l: DosingSuggestion[], k: DosingSuggestion['key']) => l.find(s => s.key === k)
const text = (s: DosingSuggestion | undefined) => (s ? [s.reason, ...s.cautions].join(' ') : '')

/** Every sentence of a suggestion list, an evaluation and an advice, checked for the other system's units. */
function expectOnlyUnitsOf(system: 'us' | 'metric', ...values: unknown[]) {
  const strings = values.flatMap(v => stringsIn(v, SI_KEYS))
  expect(strings.length).toBeGreaterThan(0)
  expect(foreignUnitsIn(strings, system)).toEqual([])
}

describe('the koi pond of the issue: 26 °C (78.8 °F), pH 8.2, TAN 2.0 mg/L as N, KH 90 mg/L, nitrite, 24,600 L (6,500 US gal), fish', () => {
  const scenario = {
    metric: { reading: { temperatureC: 26, pH: 8.2, totalAmmoniaMgL: 2.0, khMgL: 90, nitriteMgL: 0.5 }, volumeL: 24_600, third: '8,200 L' },
    // typed in °F and US gallons, stored in SI (NIST Handbook 44: °C = (°F − 32) × 5/9; 1 US gal = 3.785411784 L)
    us: { reading: { temperatureC: fahrenheitToCelsius(78.8), pH: 8.2, totalAmmoniaMgL: 2.0, khMgL: 90, nitriteMgL: 0.5 }, volumeL: usGallonsToLitres(6500), third: '2,170 US gal' },
  }

  it('un-ionized ammonia is far above its watch level (Emerson et al. 1975: pKa = 0.09018 + 2729.92/T)', () => {
    const f = unionizedAmmoniaFraction(8.2, 26)
    const pKa = 0.09018 + 2729.92 / (26 + 273.15)
    expect(f).toBeCloseTo(1 / (1 + 10 ** (pKa - 8.2)), 12)
    expect(f).toBeCloseTo(0.0880, 4)
    expect(2.0 * f * NH3_PER_N).toBeGreaterThan(10 * DEFAULT_NH3_WATCH_MGL)
  })

  for (const system of systems) {
    describe(system, () => {
      const { reading, volumeL, third } = scenario[system]
      const out = dosingSuggestions({ reading, volumeL, ranges: koi, fish: true, unitSystem: system })
      const evaluation = evaluateReading(reading, koi, { unitSystem: system })
      const phone = '555-0142'
      const advice = adviceFor(evaluation.parameters, {}, '2027-06-02', { unitSystem: system, phone, computed: evaluation.computed })

      it('no sodium bicarbonate: KH waits until ammonia is down (Emerson et al. 1975)', () => {
        expect(keys(out)).not.toContain('kh_buffer')
        expect(out.some(s => s.amount !== null && /bicarbonate/.test(s.product))).toBe(false)
        const kh = find(out, 'kh_after_ammonia')!
        expect(kh).toMatchObject({ amount: null, amountText: null, unit: '', priority: 4 })
        expect(kh.reason).toMatch(/Raise KH once ammonia is down/)
        expect(kh.reason).toMatch(/Emerson et al\. 1975/)
      })
      it('aeration first, then ammonia and nitrite, then KH (sorted by priority)', () => {
        expect(out[0]!.key).toBe('aeration')
        expect(out[0]!.priority).toBe(1)
        expect(out[0]!.amount).toBeNull()
        const priorities = out.map(s => s.priority)
        expect(priorities).toEqual([...priorities].sort((a, b) => a - b))
        expect(keys(out)).toEqual(['aeration', 'water_change_ammonia', 'water_change_nitrite', 'salt_for_nitrite', 'feeding', 'kh_after_ammonia'])
      })
      it('a first-step water change of about a third, with the steps and "retesting between" in the text', () => {
        const wc = find(out, 'water_change_ammonia')!
        expect(wc.fraction).toBeCloseTo(MAX_WATER_CHANGE_FRACTION, 12)
        expect(wc.amount).toBeCloseTo(volumeL / 3, 6)
        expect(wc.amountText).toBe(third)
        expect(wc.reason).toContain(`as a first step, change about a third of the water (${third})`)
        expect(wc.reason).toMatch(/about \d+ changes in all, retesting between them/)
        expect(wc.inputs.totalFraction as number).toBeGreaterThan(0.9)
        for (const s of out) expect(s.reason).not.toMatch(/replace about|9\d %/)
        expect(text(wc)).toMatch(/Dechlorinate the new water and match its temperature/)
      })
      it('a nitrite/salt note: chloride at least 10 × nitrite (SRAC 462), assuming no salt when none was measured', () => {
        const salt = find(out, 'salt_for_nitrite')!
        expect(salt.reason).toMatch(/10 × nitrite \(5 mg\/L\).*SRAC 462/)
        expect(salt.amount).toBeCloseTo((5 / 0.60661) * volumeL / 1e6, 5) // 5 mg/L Cl⁻ = 8.243 mg/L NaCl (NaCl 60.66 % Cl)
        expect(salt.amountText).toBe(system === 'metric' ? '205 g' : '7 oz')
        expect(text(salt)).toMatch(/assumes there is no salt/)
      })
      it('feeding advice', () => {
        const feeding = find(out, 'feeding')!
        expect(feeding).toMatchObject({ amount: null, amountText: null, priority: 2 })
        expect(feeding.reason).toMatch(/stop feeding for a day or two/)
      })
      it('every sentence in the system\'s units', () => {
        expectOnlyUnitsOf(system, out, evaluation.parameters.map(p => p.reason), advice)
        expect(out[0]!.reason).toContain(system === 'metric' ? '26 °C' : '78.8 °F')
      })
      it('the customer\'s advice: aeration first, feeding, no KH buffer, call us with the number', () => {
        expect(advice.callUs).toBe(true)
        expect(advice.lines[0]!.key).toBe('aeration')
        expect(advice.headline.startsWith(`Call us today on ${phone}.`)).toBe(true)
        expect(advice.lines.map(l => l.key)).toContain('feeding')
        const all = advice.lines.map(l => l.text).join(' ')
        expect(all).not.toMatch(/add a KH buffer as/)
        expect(advice.lines.find(l => l.key === 'khMgL')!.text).toMatch(/KH comes once ammonia is down/)
      })
      it('the customer\'s dosing helper holds the KH buffer back', () => {
        const d = homeDose({ treatment: 'kh_buffer', volumeL, currentKhMgL: 90, targetKhMgL: 120, unitSystem: system, latest: { nh3MgL: evaluation.computed.nh3MgL, nh3WatchMgL: 0.02 } })
        expect(d).toMatchObject({ amount: 0, amountText: '' })
        expect(d.callUs).toMatch(/once ammonia is down/)
        expectOnlyUnitsOf(system, d)
      })
    })
  }
})

describe('no pH or KH raiser while un-ionized ammonia is at or above its watch level (Emerson et al. 1975)', () => {
  const reading = { totalAmmoniaMgL: 0.2, pH: 7.6, temperatureC: 20, khMgL: 60 }
  const nh3 = reading.totalAmmoniaMgL * unionizedAmmoniaFraction(7.6, 20) * NH3_PER_N
  const withWatch = (watch: number): RangeTable => ({ ...koi, totalAmmoniaMgL: undefined, nh3MgL: { watchAbove: watch, source: 'test', sourceKind: 'common practice' } })

  it('at the watch level exactly: no KH buffer; just under it: the KH buffer', () => {
    expect(keys(dosingSuggestions({ reading, volumeL: 5000, ranges: withWatch(nh3) }))).toContain('kh_after_ammonia')
    expect(keys(dosingSuggestions({ reading, volumeL: 5000, ranges: withWatch(nh3) }))).not.toContain('kh_buffer')
    expect(keys(dosingSuggestions({ reading, volumeL: 5000, ranges: withWatch(nh3 * 1.001) }))).toContain('kh_buffer')
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 5000, currentKhMgL: 60, latest: { nh3MgL: nh3, nh3WatchMgL: nh3 } }).amount).toBe(0)
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 5000, currentKhMgL: 60, latest: { nh3MgL: nh3, nh3WatchMgL: nh3 * 1.001 } }).amount).toBeGreaterThan(0)
  })
  it('without a watch level of its own, the 0.02 mg/L chronic limit applies (common practice, CHECKS.md §7)', () => {
    const ranges = { ...koi, nh3MgL: undefined, totalAmmoniaMgL: undefined }
    const high = { ...reading, totalAmmoniaMgL: 0.02 / (unionizedAmmoniaFraction(7.6, 20) * NH3_PER_N) * 1.01 }
    expect(keys(dosingSuggestions({ reading: high, volumeL: 5000, ranges }))).toEqual(['feeding', 'kh_after_ammonia'])
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 5000, currentKhMgL: 60, latest: { nh3MgL: 0.021 } }).amountText).toBe('')
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 5000, currentKhMgL: 60, latest: { nh3MgL: 0.019 } }).amountText).not.toBe('')
  })
  it('when NH3 cannot be computed (no pH or temperature), high total ammonia holds KH back too', () => {
    expect(keys(dosingSuggestions({ reading: { totalAmmoniaMgL: 0.6, khMgL: 60 }, volumeL: 5000, ranges: koi }))).toContain('kh_after_ammonia')
    expect(keys(dosingSuggestions({ reading: { totalAmmoniaMgL: 0.1, khMgL: 60 }, volumeL: 5000, ranges: koi }))).toContain('kh_buffer')
  })
  it('property: never a KH buffer while NH3 ≥ its watch level, in any reading', () => {
    fc.assert(fc.property(
      fc.double({ min: 0, max: 5, noNaN: true }), fc.double({ min: 6, max: 9.5, noNaN: true }), fc.double({ min: 0, max: 35, noNaN: true }),
      fc.double({ min: 0, max: 200, noNaN: true }),
      (tan, pH, t, kh) => {
        const out = dosingSuggestions({ reading: { totalAmmoniaMgL: tan, pH, temperatureC: t, khMgL: kh }, volumeL: 10_000, ranges: koi })
        const nh3 = tan * unionizedAmmoniaFraction(pH, t) * NH3_PER_N
        if (nh3 >= 0.02) expect(keys(out)).not.toContain('kh_buffer')
        if (kh < 120 && nh3 < 0.02 && tan <= 0.25) expect(keys(out)).toContain('kh_buffer')
      },
    ))
  })
})

describe('aeration first (common practice, no source)', () => {
  it('low dissolved oxygen → aeration, priority 1, ahead of everything', () => {
    const out = dosingSuggestions({ reading: { dissolvedOxygenMgL: 4.5, khMgL: 60 }, volumeL: 5000, ranges: koi })
    expect(keys(out)).toEqual(['aeration', 'kh_buffer'])
    expect(out[0]!.reason).toMatch(/^Dissolved oxygen 4\.5 mg\/L is below 6/)
    expect(out[0]!.cautions.join(' ')).toMatch(/ground-fault/)
  })
  it('low saturation → aeration (Benson & Krause 1984: 5.2 mg/L at 28 °C is under 70 %)', () => {
    const ranges = { ...koi, dissolvedOxygenMgL: undefined }
    const out = dosingSuggestions({ reading: { dissolvedOxygenMgL: 5.2, temperatureC: 28 }, volumeL: 5000, ranges })
    expect(keys(out)).toEqual(['aeration'])
    expect(out[0]!.reason).toMatch(/oxygen saturation 6\d % is below 70 %/i)
    // at altitude the water holds less, so the same reading is a higher saturation
    expect(keys(dosingSuggestions({ reading: { dissolvedOxygenMgL: 5.2, temperatureC: 28 }, volumeL: 5000, ranges, pressureKPa: 70 }))).toEqual([])
  })
  it(`high ammonia in warm water (at or above ${WARM_WATER_C} °C) → aeration; in cool water, none`, () => {
    const warm = dosingSuggestions({ reading: { totalAmmoniaMgL: 0.5, pH: 7.0, temperatureC: WARM_WATER_C }, volumeL: 5000, ranges: koi })
    expect(warm[0]!.key).toBe('aeration')
    const cool = dosingSuggestions({ reading: { totalAmmoniaMgL: 0.5, pH: 7.0, temperatureC: WARM_WATER_C - 0.5 }, volumeL: 5000, ranges: koi })
    expect(keys(cool)).not.toContain('aeration')
    expect(keys(dosingSuggestions({ reading: { totalAmmoniaMgL: 0.1, pH: 7.0, temperatureC: 28 }, volumeL: 5000, ranges: koi }))).not.toContain('aeration')
  })
})

describe(`feeding (common practice, no source: feed lightly below ${FEED_LIGHTLY_BELOW_C} °C, stop below ${STOP_FEEDING_BELOW_C} °C)`, () => {
  const feeding = (reading: WaterReading, unitSystem: 'us' | 'metric' = 'metric') => find(dosingSuggestions({ reading, volumeL: 5000, ranges: koi, unitSystem }), 'feeding')
  it('cold water: feed lightly below about 10 °C (50 °F), stop below about 5 °C (41 °F)', () => {
    expect(feeding({ temperatureC: 8 })!.reason).toMatch(/below about 10 °C: feed lightly/)
    expect(feeding({ temperatureC: 8 }, 'us')!.reason).toMatch(/46\.4 °F, below about 50 °F: feed lightly/)
    expect(feeding({ temperatureC: 4 })!.reason).toMatch(/below about 5 °C: stop feeding/)
    expect(feeding({ temperatureC: 4 }, 'us')!.reason).toMatch(/below about 41 °F: stop feeding/)
    expect(feeding({ temperatureC: 4 })!.priority).toBe(5)
    expect(feeding({ temperatureC: 10 })).toBeUndefined()
  })
  it('ammonia or nitrite above their watch level: feed lightly; above the act level: stop for a day or two', () => {
    expect(feeding({ totalAmmoniaMgL: 0.5 })!.reason).toMatch(/^Ammonia is above the watch level: feed lightly/)
    expect(feeding({ nitriteMgL: 0.2 })!.reason).toMatch(/^Nitrite is above the watch level/)
    expect(feeding({ nitriteMgL: 0.3 })!.reason).toMatch(/^Nitrite is high: stop feeding for a day or two/)
    expect(feeding({ totalAmmoniaMgL: 0.5 })!.priority).toBe(2)
    expect(feeding({ totalAmmoniaMgL: 0.2, nitriteMgL: 0.05, temperatureC: 18 })).toBeUndefined()
  })
})

describe('safety cautions wherever a chemical is dosed (PRODUCT.md, Safety)', () => {
  it('KH buffer, pond salt and dechlorinator carry gloves and eye protection, never mixing, the label, children and pets', () => {
    const out = dosingSuggestions({
      reading: { khMgL: 60, nitriteMgL: 0.05, saltGL: 0 }, volumeL: 5000, ranges: koi, fish: true,
      topUpLitres: 500, dechlorinatorRate: { amount: 5, unit: 'mL', perLitres: 400 },
    })
    expect(keys(out)).toEqual(expect.arrayContaining(['kh_buffer', 'salt_for_nitrite', 'dechlorinator']))
    for (const s of out.filter(x => x.amount !== null)) {
      for (const c of CHEMICAL_CAUTIONS) expect(s.cautions, `${s.key}: ${c}`).toContain(c)
    }
    expect(CHEMICAL_CAUTIONS).toEqual([SAFETY.gloves, SAFETY.neverMix, SAFETY.label, SAFETY.children])
    expect(SAFETY.gloves).toBe('Wear gloves and eye protection')
    expect(SAFETY.neverMix).toMatch(/^Never mix products/)
    for (const t of ['dechlorinator', 'salt', 'kh_buffer'] as const) {
      expect(homeDose({ treatment: t, volumeL: 4000, label: { amount: 5, unit: 'mL', perLitres: 400 }, topUpL: 100 }).cautions.join(' ')).toMatch(/gloves and eye protection\. Never mix products/)
    }
  })
  it('medications: beneficial bacteria and the UV clarifier', () => {
    expect(MEDICATION_CAUTIONS.bacteria).toMatch(/harm the filter's beneficial bacteria/)
    expect(MEDICATION_CAUTIONS.uv).toMatch(/Switch the UV clarifier off while a medication is in the water/)
  })
})

describe('properties over random readings, in both systems', () => {
  const opt = (a: fc.Arbitrary<number>) => fc.option(a, { nil: undefined })
  const readings = fc.record({
    temperatureC: opt(fc.double({ min: 0, max: 40, noNaN: true })),
    pH: opt(fc.double({ min: 5, max: 10, noNaN: true })),
    totalAmmoniaMgL: opt(fc.double({ min: 0, max: 8, noNaN: true })),
    nitriteMgL: opt(fc.double({ min: 0, max: 3, noNaN: true })),
    khMgL: opt(fc.double({ min: 0, max: 250, noNaN: true })),
    dissolvedOxygenMgL: opt(fc.double({ min: 0, max: 14, noNaN: true })),
    saltGL: opt(fc.double({ min: 0, max: 8, noNaN: true })),
    chlorineMgL: opt(fc.double({ min: 0, max: 2, noNaN: true })),
    nitrateMgL: opt(fc.double({ min: 0, max: 100, noNaN: true })),
  })
  const system = fc.constantFrom('us', 'metric') as fc.Arbitrary<'us' | 'metric'>

  it('dosing: sorted by priority, first steps of at most a third, only the system\'s units', () => {
    fc.assert(fc.property(readings, system, fc.double({ min: 100, max: 200_000, noNaN: true }), (reading, sys, volumeL) => {
      const out = dosingSuggestions({ reading, volumeL, ranges: koi, fish: true, unitSystem: sys, topUpLitres: 300, dechlorinatorRate: { amount: 5, unit: 'mL', perLitres: 400 } })
      const p = out.map(s => s.priority)
      expect(p).toEqual([...p].sort((a, b) => a - b))
      for (const s of out) {
        if (s.key.startsWith('water_change')) {
          expect(s.fraction!).toBeLessThanOrEqual(MAX_WATER_CHANGE_FRACTION + 1e-12)
          expect(s.amount!).toBeCloseTo(s.fraction! * volumeL, 6)
        }
        expect(s.amountText === null).toBe(s.amount === null)
      }
      expectOnlyUnitsOf(sys, out)
    }), { numRuns: 300 })
  })
  it('evaluation: act reasons say "act today", watch reasons use no act words, all in the system\'s units', () => {
    fc.assert(fc.property(readings, system, (reading, sys) => {
      const e = evaluateReading(reading, koi, { unitSystem: sys })
      for (const p of e.parameters) {
        if (p.status === 'act') expect(p.reason).toMatch(/act today/)
        else expect(p.reason, p.reason).not.toMatch(ACT_WORDS)
      }
      if (e.parameters.length) expectOnlyUnitsOf(sys, e.parameters.map(p => p.reason))
    }), { numRuns: 300 })
  })
  it('advice: call us only with the number, watch lines without act words, no KH buffer while NH3 is high, off results first', () => {
    fc.assert(fc.property(readings, system, fc.option(fc.constantFrom('555-0142', '+1 555 0100'), { nil: null }), (reading, sys, phone) => {
      const e = evaluateReading(reading, koi, { unitSystem: sys })
      const a = adviceFor(e.parameters, {}, null, { unitSystem: sys, phone, computed: e.computed })
      const texts = [a.headline, ...a.lines.map(l => l.text)]
      for (const t of texts) {
        if (/call/i.test(t)) expect(t).toMatch(phone ? new RegExp(`Call us today on ${phone.replace(/\+/g, '\\+')}\\.`) : /Call your pond company today\./)
      }
      expect(a.lines.filter(l => /^Call /.test(l.text))).toHaveLength(a.callUs ? 1 : 0)
      for (const l of a.lines) if (l.status === 'watch') expect(l.text, l.text).not.toMatch(ACT_WORDS)
      if ((e.computed.nh3MgL ?? 0) >= 0.02) expect(texts.join(' ')).not.toMatch(/add a KH buffer as|a KH buffer steadies pH/)
      const firstOk = a.lines.findIndex(l => l.status === 'ok')
      if (firstOk >= 0) expect(a.lines.slice(firstOk).every(l => l.status === 'ok')).toBe(true)
      expect(new Set(a.lines.map(l => l.key)).size).toBe(a.lines.length)
      if (texts.length > 1) expectOnlyUnitsOf(sys, texts)
    }), { numRuns: 300 })
  })
})
