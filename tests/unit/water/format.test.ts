import fc from 'fast-check'
import { unit } from 'mathjs'
import { describe, expect, it } from 'vitest'
import {
  digitsFor, formatAmount, formatDose, formatNumber, formatQuantity, fromDisplay, OUNCE_G, toDisplay, unitFor, US_FL_OZ_ML,
  type QuantityKind, type UnitSystem,
} from '../../../shared/utils/water/format'
import { foreignUnits } from '../../helpers/units-scan'

// Conversions: exact definitions of NIST Handbook 44, Appendix C (1 in = 2.54 cm, 1 US gal = 231 in³,
// 1 lb = 0.45359237 kg; 1 fl oz = 1/128 gal, 1 oz = 1/16 lb), checked against mathjs as an
// independent oracle over many random values. Rounding to what a person can measure out is the
// product's rule (common practice, no source).
const REL = 1e-12
const near = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(REL * Math.max(1, Math.abs(b)))

/** Each displayed unit: stored SI unit and shown unit, as mathjs names them. */
const ORACLE: Record<QuantityKind, Record<UnitSystem, [si: string, shown: string, shownName: string] | null>> = {
  temperature: { us: ['degC', 'degF', '°F'], metric: ['degC', 'degC', '°C'] },
  volume: { us: ['L', 'gal', 'US gal'], metric: ['L', 'L', 'L'] },
  liquid: { us: ['mL', 'floz', 'fl oz'], metric: ['mL', 'mL', 'mL'] },
  mass: { us: ['g', 'oz', 'oz'], metric: ['g', 'g', 'g'] },
  length: { us: ['m', 'ft', 'ft'], metric: ['m', 'm', 'm'] },
  depth: { us: ['m', 'in', 'in'], metric: ['m', 'cm', 'cm'] },
  level: { us: ['mm', 'in', 'in'], metric: ['mm', 'cm', 'cm'] },
  altitude: { us: ['m', 'ft', 'ft'], metric: ['m', 'm', 'm'] },
  area: { us: ['m^2', 'ft^2', 'ft²'], metric: ['m^2', 'm^2', 'm²'] },
  flow: { us: ['L/h', 'gal/h', 'US gal/h'], metric: ['L/h', 'L/h', 'L/h'] },
  concentration: { us: ['mg/L', 'mg/L', 'mg/L'], metric: ['mg/L', 'mg/L', 'mg/L'] },
  salt: { us: null, metric: ['g/L', 'g/L', 'g/L'] },
  percent: { us: null, metric: null },
  pH: { us: null, metric: null },
  plain: { us: null, metric: null },
}

describe('every displayed unit against mathjs (NIST Handbook 44, Appendix C; fast-check)', () => {
  const value = fc.double({ min: 0, max: 1e6, noNaN: true })
  for (const [kind, systems] of Object.entries(ORACLE) as Array<[QuantityKind, (typeof ORACLE)[QuantityKind]]>) {
    for (const system of ['us', 'metric'] as const) {
      const o = systems[system]
      if (!o) continue
      const [si, shown, name] = o
      it(`${kind} in ${system}: ${si} → ${name} and back`, () => {
        expect(unitFor(kind, system)).toBe(name)
        const v = kind === 'temperature' ? fc.double({ min: -50, max: 150, noNaN: true }) : value
        fc.assert(fc.property(v, (x) => {
          const want = unit(x, si).toNumber(shown)
          if (kind === 'temperature') {
            expect(toDisplay(kind, x, system)).toBeCloseTo(want, 9)
            expect(fromDisplay(kind, want, system)).toBeCloseTo(x, 9)
          }
          else {
            near(toDisplay(kind, x, system), want)
            near(fromDisplay(kind, want, system), x)
          }
        }))
      })
    }
  }
  it('salt in US is percent w/v (grams per 100 mL): 1 g/L = 0.1 % (C, CHECKS.md §5)', () => {
    expect(unitFor('salt', 'us')).toBe('%')
    fc.assert(fc.property(fc.double({ min: 0, max: 100, noNaN: true }), (gl) => {
      near(toDisplay('salt', gl, 'us'), unit(gl, 'g/L').toNumber('g/mL') * 100)
      near(fromDisplay('salt', toDisplay('salt', gl, 'us'), 'us'), gl)
    }))
  })
  it('neutral kinds show the stored number: percent, pH, plain', () => {
    for (const kind of ['percent', 'pH', 'plain'] as const) {
      for (const system of ['us', 'metric'] as const) {
        expect(toDisplay(kind, 7.25, system)).toBe(7.25)
        expect(fromDisplay(kind, 7.25, system)).toBe(7.25)
      }
    }
    expect(unitFor('percent', 'us')).toBe('%')
    expect(unitFor('pH', 'metric')).toBe('')
  })
  it('the fluid ounce and the ounce are exact fractions of the gallon and the pound (NIST HB 44)', () => {
    near(US_FL_OZ_ML, 29.5735295625)
    near(OUNCE_G, 28.349523125)
  })
})

describe('formatQuantity: the system\'s unit and its digits', () => {
  it('shows the published example figures', () => {
    expect(formatQuantity('temperature', 26, 'us')).toBe('78.8 °F') // 26 × 9/5 + 32 (NIST HB 44)
    expect(formatQuantity('temperature', 26, 'metric')).toBe('26 °C')
    expect(formatQuantity('volume', 24_605.17, 'us')).toBe('6,500 US gal') // 6,500 × 3.785411784 L
    expect(formatQuantity('volume', 5678.1, 'metric')).toBe('5,678 L')
    expect(formatQuantity('depth', 0.3048, 'us')).toBe('12 in')
    expect(formatQuantity('depth', 0.3048, 'metric')).toBe('30.5 cm')
    expect(formatQuantity('level', 25.4, 'us')).toBe('1 in')
    expect(formatQuantity('level', 25, 'metric')).toBe('2.5 cm')
    expect(formatQuantity('area', 1, 'us')).toBe('11 ft²') // 1 / 0.09290304 = 10.76
    expect(formatQuantity('salt', 3, 'us')).toBe('0.3 %')
    expect(formatQuantity('salt', 3, 'metric')).toBe('3 g/L')
    expect(formatQuantity('pH', 7, 'us')).toBe('7.0')
    expect(formatQuantity('percent', 84.7, 'metric')).toBe('85 %')
    expect(formatQuantity('temperature', 26, 'us', { bare: true })).toBe('78.8')
    expect(formatQuantity('concentration', 0.125, 'us', { digits: 3 })).toBe('0.125 mg/L')
  })
  it('digits by kind and system', () => {
    expect(digitsFor('liquid', 'us')).toBe(1)
    expect(digitsFor('liquid', 'metric')).toBe(0)
    expect(digitsFor('length', 'metric')).toBe(2)
    expect(formatNumber(1234.5678, 2)).toBe('1,234.57')
    expect(formatNumber(-0, 2)).toBe('0')
    expect(formatNumber(7, 1, 1)).toBe('7.0')
  })
})

describe('formatAmount and formatDose: what a person can measure out (common practice, no source)', () => {
  it('the brief\'s examples', () => {
    expect(formatAmount('mass', 1237.87, 'metric')).toBe('1.2 kg')
    expect(formatAmount('mass', 1237.87, 'us')).toBe('2.7 lb') // 1237.87 / 453.59237 = 2.73
    expect(formatAmount('volume', 7800, 'metric')).toBe('7,800 L')
    expect(formatAmount('volume', usGal(2060), 'us')).toBe('2,060 US gal')
  })
  it('steps: grams by 0.5 below 10 g, by 1 below 100 g, by 5 below 1 kg; ounces by 0.1 below 2 oz, by 0.5 below 1 lb', () => {
    expect(formatAmount('mass', 3.3, 'metric')).toBe('3.5 g')
    expect(formatAmount('mass', 42.4, 'metric')).toBe('42 g')
    expect(formatAmount('mass', 203.2, 'metric')).toBe('205 g')
    expect(formatAmount('mass', 0.1, 'metric')).toBe('0.5 g') // never "0 g" for a dose
    expect(formatAmount('mass', OUNCE_G * 1.23, 'us')).toBe('1.2 oz')
    expect(formatAmount('mass', OUNCE_G * 7.2, 'us')).toBe('7 oz')
    expect(formatAmount('mass', 0, 'us')).toBe('0 oz')
    expect(formatAmount('liquid', 4.2, 'metric')).toBe('4 mL')
    expect(formatAmount('liquid', 1500, 'metric')).toBe('1.5 L')
    expect(formatAmount('liquid', US_FL_OZ_ML * 0.5, 'us')).toBe('0.5 fl oz')
    expect(formatAmount('liquid', US_FL_OZ_ML * 10.2, 'us')).toBe('10 fl oz')
    expect(formatAmount('liquid', US_FL_OZ_ML * 256, 'us')).toBe('2 US gal')
    expect(formatAmount('volume', 999.4, 'metric')).toBe('999 L')
    expect(formatAmount('volume', 8203, 'metric')).toBe('8,200 L')
  })
  it('property: the shown amount is the SI amount (mathjs) to within its rounding step, in its system only', () => {
    const parse = (s: string) => { const [n, ...u] = s.split(' '); return { n: Number(n!.replace(/,/g, '')), u: u.join(' ') } }
    const MATH: Record<string, string> = { 'g': 'g', 'kg': 'kg', 'oz': 'oz', 'lb': 'lb', 'mL': 'mL', 'L': 'L', 'fl oz': 'floz', 'US gal': 'gal' }
    fc.assert(fc.property(fc.double({ min: 0.5, max: 2e6, noNaN: true }), fc.constantFrom('mass', 'liquid') as fc.Arbitrary<'mass' | 'liquid'>, fc.constantFrom('us', 'metric') as fc.Arbitrary<UnitSystem>, (si, kind, system) => {
      const text = formatAmount(kind, si, system)
      expect(foreignUnits(text, system)).toEqual([])
      const { n, u } = parse(text)
      const exact = unit(si, kind === 'mass' ? 'g' : 'mL').toNumber(MATH[u]!)
      const step = u === 'kg' || u === 'lb' || u === 'L' || u === 'US gal' ? 0.1 : exact < 2 ? 0.5 : exact < 100 ? 1 : 5
      expect(Math.abs(n - exact)).toBeLessThanOrEqual(step / 2 + 1e-9 + (exact < step ? step : 0))
    }))
  })
  it('a label dose in any unit, shown in the system', () => {
    expect(formatDose(5, 'mL', 'us')).toBe('0.2 fl oz')
    expect(formatDose(1, 'US gal', 'metric')).toBe('3.8 L')
    expect(formatDose(2, 'lb', 'metric')).toBe('905 g')
    expect(formatDose(4, 'kg', 'us')).toBe('8.8 lb')
    expect(formatDose(1, 'ft³', 'metric')).toBe('28.3 L')
    expect(formatDose(1, 'gal', 'metric')).toBe('3.8 L')
    expect(formatDose(500, 'ml', 'us')).toBe('17 fl oz')
    expect(formatDose(0.5, 'l', 'us')).toBe('17 fl oz')
    expect(formatDose(10, 'fl oz', 'metric')).toBe('295 mL')
    expect(formatDose(8, 'oz', 'metric')).toBe('225 g')
    expect(formatDose(3, 'tablets', 'us')).toBe('3 tablets')
    expect(formatDose(12.4, 'scoops', 'us')).toBe('12 scoops')
  })
})

function usGal(g: number): number { return unit(g, 'gal').toNumber('L') }
