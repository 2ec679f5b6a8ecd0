import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  ammoniaPKa, ammoniaToNitrogen, nitrogenToAmmonia, NH3_PER_N, unionizedAmmonia, unionizedAmmoniaFraction, WaterInputError,
} from '../../../shared/utils/water-chemistry'

// Emerson, K., Russo, R.C., Lund, R.E., Thurston, R.V. (1975). Aqueous ammonia equilibrium
// calculations: effect of pH and temperature. J. Fish. Res. Board Can. 32(12): 2379–2383.
// Table as reproduced in Francis-Floyd, R., Watson, C., Petty, D., Pouder, D.B., "Ammonia in
// Aquatic Systems", UF/IFAS Extension FA16 — P (published), ±0.0001 absolute.
const TEMPS = [10, 20, 24, 30] as const
const FA16_TABLE: Record<string, readonly number[]> = {
  '7.0': [0.0018, 0.0039, 0.0052, 0.0080],
  '7.6': [0.0073, 0.0155, 0.0206, 0.0310],
  '8.0': [0.0182, 0.0381, 0.0502, 0.0743],
  '8.4': [0.0445, 0.0904, 0.1171, 0.1678],
}
const TABLE_TOL = 0.0001

/** The same equation with the misprinted constant 2727.92 that circulates in some copies. */
const misprintedFraction = (pH: number, t: number) => 1 / (1 + 10 ** (0.09018 + 2727.92 / (t + 273.15) - pH))

describe('un-ionized ammonia fraction — Emerson et al. 1975, table in UF/IFAS FA16 (P, ±0.0001)', () => {
  for (const [pH, row] of Object.entries(FA16_TABLE)) {
    TEMPS.forEach((t, i) => {
      it(`pH ${pH}, ${t} °C → ${row[i]} (P, Emerson et al. 1975 via FA16)`, () => {
        expect(Math.abs(unionizedAmmoniaFraction(Number(pH), t) - row[i]!)).toBeLessThanOrEqual(TABLE_TOL)
      })
    })
  }

  it('worked example, FA16 (P): 24 °C, pH 8.0, TAN 1.0 mg/L → 0.0502 mg/L un-ionized', () => {
    expect(Math.abs(unionizedAmmonia(1.0, 8.0, 24) - 0.0502)).toBeLessThanOrEqual(TABLE_TOL)
  })

  it('Durborow, Crosby & Brunson 1992, Ammonia in Fish Ponds, SRAC 463 (P): pH 8.6, 30 °C → 0.2422; TAN 3 → 0.73 mg/L', () => {
    expect(Math.abs(unionizedAmmoniaFraction(8.6, 30) - 0.2422)).toBeLessThanOrEqual(TABLE_TOL)
    expect(Math.abs(unionizedAmmonia(3, 8.6, 30) - 0.73)).toBeLessThanOrEqual(0.005)
  })

  it('pKa (C, Emerson et al. 1975 equation): 9.4025 at 20 °C, 9.2464 at 25 °C', () => {
    expect(ammoniaPKa(20)).toBeCloseTo(9.4025, 4)
    expect(ammoniaPKa(25)).toBeCloseTo(9.2464, 4)
  })

  it('negative check: the misprinted constant 2727.92 fails the 20 °C column where our function passes', () => {
    // At pH 7.0 the shift (+1.6 %) is below the table's rounding; at pH 7.6, 8.0 and 8.4 it is not.
    for (const pH of ['7.6', '8.0', '8.4']) {
      const published = FA16_TABLE[pH]![1]!
      const ours = unionizedAmmoniaFraction(Number(pH), 20)
      const wrong = misprintedFraction(Number(pH), 20)
      expect(Math.abs(ours - published)).toBeLessThanOrEqual(TABLE_TOL)
      expect(Math.abs(wrong - published)).toBeGreaterThan(TABLE_TOL)
      expect(Math.abs(ours - wrong)).toBeGreaterThan(TABLE_TOL)
      // about +1.4–1.6 % (the relative shift shrinks as the fraction grows)
      expect(wrong / ours).toBeGreaterThan(1.014)
      expect(wrong / ours).toBeLessThan(1.016)
    }
  })
})

describe('ammonia basis (C, IUPAC conventional atomic weights)', () => {
  it('NH3-N → NH3 multiplies by 17.031 / 14.007 = 1.2159', () => {
    expect(NH3_PER_N).toBeCloseTo(1.2159, 4)
    expect(nitrogenToAmmonia(1)).toBeCloseTo(1.2159, 4)
    expect(ammoniaToNitrogen(1.2159)).toBeCloseTo(1, 4)
  })
  it('the fraction applies to either basis: NH3 as N × 1.2159 = NH3 from TAN as NH3', () => {
    const asN = unionizedAmmonia(0.5, 8.2, 22)
    const asNH3 = unionizedAmmonia(nitrogenToAmmonia(0.5), 8.2, 22)
    expect(asNH3).toBeCloseTo(nitrogenToAmmonia(asN), 12)
  })
  it('round-trips over many values (property)', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 1000, noNaN: true }), (x) => {
      expect(ammoniaToNitrogen(nitrogenToAmmonia(x))).toBeCloseTo(x, 9)
    }))
  })
})

describe('properties (fast-check)', () => {
  const pH = fc.double({ min: 0, max: 14, noNaN: true })
  const temp = fc.double({ min: 0, max: 45, noNaN: true })

  it('stays within 0..1 and is finite for every pH 0–14 and 0–45 °C', () => {
    fc.assert(fc.property(pH, temp, (p, t) => {
      const f = unionizedAmmoniaFraction(p, t)
      expect(Number.isFinite(f)).toBe(true)
      expect(f).toBeGreaterThanOrEqual(0)
      expect(f).toBeLessThanOrEqual(1)
    }))
  })

  it('increases with pH', () => {
    fc.assert(fc.property(fc.double({ min: 4, max: 11, noNaN: true }), fc.double({ min: 0.01, max: 2, noNaN: true }), temp, (p, d, t) => {
      expect(unionizedAmmoniaFraction(p + d, t)).toBeGreaterThan(unionizedAmmoniaFraction(p, t))
    }))
  })

  it('increases with temperature', () => {
    fc.assert(fc.property(fc.double({ min: 4, max: 11, noNaN: true }), fc.double({ min: 0, max: 40, noNaN: true }), fc.double({ min: 0.1, max: 5, noNaN: true }), (p, t, d) => {
      expect(unionizedAmmoniaFraction(p, t + d)).toBeGreaterThan(unionizedAmmoniaFraction(p, t))
    }))
  })

  it('un-ionized ammonia is linear in TAN', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 50, noNaN: true }), pH, temp, (tan, p, t) => {
      expect(unionizedAmmonia(2 * tan, p, t)).toBeCloseTo(2 * unionizedAmmonia(tan, p, t), 9)
    }))
  })
})

describe('input range (WaterInputError)', () => {
  const field = (fn: () => unknown) => {
    try { fn() } catch (e) { expect(e).toBeInstanceOf(WaterInputError); expect(e).toBeInstanceOf(RangeError); return (e as WaterInputError).field }
    throw new Error('did not throw')
  }
  it('names the field', () => {
    expect(field(() => unionizedAmmoniaFraction(14.1, 20))).toBe('pH')
    expect(field(() => unionizedAmmoniaFraction(-0.1, 20))).toBe('pH')
    expect(field(() => unionizedAmmoniaFraction(Number.NaN, 20))).toBe('pH')
    expect(field(() => unionizedAmmoniaFraction(7, -1))).toBe('tempC')
    expect(field(() => unionizedAmmoniaFraction(7, 46))).toBe('tempC')
    expect(field(() => unionizedAmmoniaFraction(7, Number.POSITIVE_INFINITY))).toBe('tempC')
    expect(field(() => unionizedAmmonia(-1, 7, 20))).toBe('tanMgL')
    expect(field(() => nitrogenToAmmonia(-1))).toBe('mgLasN')
    expect(field(() => ammoniaToNitrogen(-1))).toBe('mgLasNH3')
  })
  it('says so in plain words', () => {
    expect(() => unionizedAmmoniaFraction(15, 20)).toThrow('pH must be between 0 and 14')
  })
})
