import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  oxygenPercentSaturation, oxygenSaturationMgL, pressureAtAltitudeKPa, STANDARD_PRESSURE_KPA, waterVapourPressureAtm,
  WaterInputError, feetToMetres,
} from '../../../shared/utils/water-chemistry'

// Benson, B.B., Krause, D. (1984). The concentration and isotopic fractionation of oxygen dissolved
// in freshwater and seawater in equilibrium with the atmosphere. Limnol. Oceanogr. 29: 620–632;
// as adopted by APHA Standard Methods 4500-O and USGS OWQ Technical Memorandum 2011.03.
const atm = (a: number) => a * STANDARD_PRESSURE_KPA

describe('DO saturation, fresh water, 1 atm — Benson & Krause 1984 (C, ±0.005 mg/L)', () => {
  const table: Array<[number, number, number]> = [
    // t °C, C* computed from the equation (C), 3-figure printed value (P: ISO 5814 / EN 25814 table)
    [0, 14.621, 14.6],
    [10, 11.288, 11.3],
    [20, 9.092, 9.09],
    [30, 7.559, 7.56],
  ]
  for (const [t, c, printed] of table) {
    it(`${t} °C → ${c} mg/L (C); printed ${printed} (P, ISO 5814 / EN 25814)`, () => {
      const v = oxygenSaturationMgL(t)
      expect(Math.abs(v - c)).toBeLessThanOrEqual(0.005)
      // agrees with the printed table to its 3 figures
      expect(Number(v.toPrecision(3))).toBe(printed)
    })
  }

  it('pressure correction (C, Benson & Krause 1984 / Standard Methods 4500-O): 20 °C, 0.90 atm → 8.162 mg/L ±0.005', () => {
    const v = oxygenSaturationMgL(20, atm(0.9))
    expect(Math.abs(v - 8.162)).toBeLessThanOrEqual(0.005)
  })

  it('does NOT return the simple approximation C*·P = 8.183 at 0.90 atm', () => {
    const simple = oxygenSaturationMgL(20) * 0.9
    expect(simple).toBeCloseTo(8.183, 3)
    expect(Math.abs(oxygenSaturationMgL(20, atm(0.9)) - simple)).toBeGreaterThan(0.015)
  })

  it('water-vapour pressure at 20 °C is about 0.0231 atm (C, same sources; 2.34 kPa)', () => {
    expect(waterVapourPressureAtm(20)).toBeCloseTo(0.02306, 4)
  })

  it('percent saturation (C): DO 7.0 mg/L at 25 °C, 1 atm → 84.7 %', () => {
    expect(oxygenPercentSaturation(7.0, 25)).toBeCloseTo(84.7, 1)
  })
})

describe('pressure at altitude', () => {
  it('sea level is 101.325 kPa', () => {
    expect(pressureAtAltitudeKPa(0)).toBe(101.325)
  })
  it('agrees within 0.002 relative with the Wisconsin DNR laboratory certification factor at 600 ft (P: 0.9795)', () => {
    // WDNR: CF = (760 − 0.026·ft)/760, a linear approximation; ours is the standard atmosphere.
    // They are different approximations, so only agreement to 0.2 % is expected.
    const wdnr = (760 - 0.026 * 600) / 760
    expect(wdnr).toBeCloseTo(0.9795, 4)
    const ours = pressureAtAltitudeKPa(feetToMetres(600)) / 101.325
    expect(Math.abs(ours - wdnr) / wdnr).toBeLessThan(0.002)
  })
  it('falls with altitude (property)', () => {
    fc.assert(fc.property(fc.double({ min: -500, max: 5900, noNaN: true }), fc.double({ min: 1, max: 100, noNaN: true }), (h, d) => {
      expect(pressureAtAltitudeKPa(h + d)).toBeLessThan(pressureAtAltitudeKPa(h))
    }))
  })
})

describe('properties (fast-check)', () => {
  const temp = fc.double({ min: 0, max: 45, noNaN: true })
  const kpa = fc.double({ min: 50, max: 110, noNaN: true })

  it('finite and positive everywhere in range', () => {
    fc.assert(fc.property(temp, kpa, (t, p) => {
      const v = oxygenSaturationMgL(t, p)
      expect(Number.isFinite(v)).toBe(true)
      expect(v).toBeGreaterThan(0)
    }))
  })

  it('decreases with temperature', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 44, noNaN: true }), fc.double({ min: 0.05, max: 1, noNaN: true }), kpa, (t, d, p) => {
      expect(oxygenSaturationMgL(t + d, p)).toBeLessThan(oxygenSaturationMgL(t, p))
    }))
  })

  it('increases with pressure, roughly in proportion', () => {
    fc.assert(fc.property(temp, fc.double({ min: 50, max: 100, noNaN: true }), fc.double({ min: 0.5, max: 10, noNaN: true }), (t, p, d) => {
      const a = oxygenSaturationMgL(t, p)
      const b = oxygenSaturationMgL(t, p + d)
      expect(b).toBeGreaterThan(a)
      // Ratio close to the pressure ratio (vapour pressure makes it a little larger, most at 45 °C and low pressure).
      const ratio = b / a
      const pRatio = (p + d) / p
      expect(ratio).toBeGreaterThanOrEqual(pRatio * 0.999)
      expect(ratio).toBeLessThan(pRatio * 1.06)
    }))
  })

  it('percent saturation is linear in DO', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 30, noNaN: true }), temp, kpa, (d, t, p) => {
      expect(oxygenPercentSaturation(2 * d, t, p)).toBeCloseTo(2 * oxygenPercentSaturation(d, t, p), 9)
    }))
  })
})

describe('input range (WaterInputError)', () => {
  const field = (fn: () => unknown) => {
    try { fn() } catch (e) { expect(e).toBeInstanceOf(WaterInputError); return (e as WaterInputError).field }
    throw new Error('did not throw')
  }
  it('names the field', () => {
    expect(field(() => oxygenSaturationMgL(-0.5))).toBe('tempC')
    expect(field(() => oxygenSaturationMgL(50))).toBe('tempC')
    expect(field(() => oxygenSaturationMgL(20, 49))).toBe('pressureKPa')
    expect(field(() => oxygenSaturationMgL(20, 111))).toBe('pressureKPa')
    expect(field(() => oxygenSaturationMgL(20, Number.NaN))).toBe('pressureKPa')
    expect(field(() => pressureAtAltitudeKPa(-501))).toBe('altitudeM')
    expect(field(() => pressureAtAltitudeKPa(6001))).toBe('altitudeM')
    expect(field(() => oxygenPercentSaturation(-1, 20))).toBe('doMgL')
  })
})
