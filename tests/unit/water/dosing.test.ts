import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { DosingSuggestion, WaterReading } from '../../../shared/types/water'
import {
  BICARBONATE_G_PER_1000L_PER_DKH, bicarbonateForKH, chloramineAmmoniaNMgL, CHLORIDE_MASS_FRACTION_NACL, dailyWaterLossMm,
  dechlorinatorDose, DEFAULT_PROFILES, doseFromLabelRate, dosingSuggestions, EVAPORATION_ALLOWANCE_MM_PER_DAY,
  kgToPounds, MAX_KH_RISE_DKH_PER_DAY, MAX_WATER_CHANGE_FRACTION, mgLCaCO3ToDkh, mmToTopUpLitres, NAHCO3_MG_PER_MG_CACO3,
  saltGLToChlorideMgL, saltToTarget, thiosulfatePerChlorine, topUpLitresToMm, turnoverPerHour, TURNOVER_TARGET_PER_HOUR,
  usGallonsToLitres, waterChangeFraction, waterChangesNeeded, waterfallFlowLph, WATERFALL_US_GPH_PER_INCH, WaterInputError,
  waterLossStatus, inchesToMm, squareFeetToSquareMetres, litresToUsGallons, unionizedAmmonia, unionizedAmmoniaFraction, dkhToMgLCaCO3,
} from '../../../shared/utils/water-chemistry'

const within = (value: number, expected: number, rel: number) => expect(Math.abs(value - expected) / expected).toBeLessThanOrEqual(rel)

describe('KH buffer: sodium bicarbonate (C, CHECKS.md §4: stoichiometry, ±0.1 %)', () => {
  it('NaHCO3 84.006 g/mol, 1 eq/mol; CaCO3 50.043 g/eq → 1.6787 mg per mg/L as CaCO3', () => {
    within(NAHCO3_MG_PER_MG_CACO3, 1.6787, 0.001)
    within(NAHCO3_MG_PER_MG_CACO3, 84.006 / 50.043, 0.0001)
  })
  it('1 dKH in 1000 L needs 29.96 g', () => {
    within(BICARBONATE_G_PER_1000L_PER_DKH, 29.96, 0.001)
    within(bicarbonateForKH(1000, 0, 1), 29.96, 0.001)
    within(bicarbonateForKH(1000, 4, 5), 29.96, 0.001)
  })
  it('5000 L from 3 to 6 dKH → 449.4 g', () => {
    within(bicarbonateForKH(5000, 3, 6), 5 * 3 * 29.96, 0.001)
  })
  it('returns 0 when no rise is needed', () => {
    expect(bicarbonateForKH(1000, 6, 6)).toBe(0)
    expect(bicarbonateForKH(1000, 7, 5)).toBe(0)
  })
})

describe('salt (C, CHECKS.md §5)', () => {
  it('0.1 % (1 g/L) in 1000 US gal = 8.345 lb', () => {
    expect(kgToPounds(saltToTarget(usGallonsToLitres(1000), 0, 1))).toBeCloseTo(8.345, 3)
  })
  it('0.1 % = 1.000 kg per m³', () => {
    expect(saltToTarget(1000, 0, 1)).toBeCloseTo(1.0, 12)
  })
  it('"1 lb per 100 gal = 0.1 %" is trade shorthand: it is really 0.12 % (1.198 g/L), not 0.1 %', () => {
    const gPerL = 453.59237 / usGallonsToLitres(100)
    expect(gPerL).toBeCloseTo(1.198, 3)
    // our salt dose for 0.1 % in 100 gal is NOT 1 lb
    const lbFor01Pct = kgToPounds(saltToTarget(usGallonsToLitres(100), 0, 1))
    expect(lbFor01Pct).toBeCloseTo(0.8345, 4)
    expect(Math.abs(lbFor01Pct - 1)).toBeGreaterThan(0.1)
  })
  it('NaCl is 60.66 % chloride by mass', () => {
    expect(CHLORIDE_MASS_FRACTION_NACL * 100).toBeCloseTo(60.66, 2)
    expect(saltGLToChlorideMgL(1)).toBeCloseTo(606.6, 0)
  })
  it('raises from current to target only', () => {
    expect(saltToTarget(2000, 1, 3)).toBeCloseTo(4, 12)
    expect(saltToTarget(2000, 3, 3)).toBe(0)
    expect(saltToTarget(2000, 4, 3)).toBe(0)
  })
})

describe('dechlorination with sodium thiosulfate (C, CHECKS.md §6, ±0.2 %)', () => {
  it('to sulfate: 0.5575 mg Na2S2O3 (0.8751 mg pentahydrate) per mg Cl2', () => {
    within(thiosulfatePerChlorine('sulfate'), 0.5575, 0.002)
    within(thiosulfatePerChlorine('sulfate', true), 0.8751, 0.002)
  })
  it('to tetrathionate: 4.460 mg (7.001 mg pentahydrate) per mg Cl2', () => {
    within(thiosulfatePerChlorine('tetrathionate'), 4.460, 0.002)
    within(thiosulfatePerChlorine('tetrathionate', true), 7.001, 0.002)
  })
  it('1 mg/L monochloramine as Cl2 releases 0.1976 mg/L NH3-N when reduced', () => {
    within(chloramineAmmoniaNMgL(1), 0.1976, 0.002)
  })
  it('dechlorinator dose is the label rate scaled to the top-up volume', () => {
    expect(dechlorinatorDose(2000, { amount: 5, unit: 'mL', perLitres: 400 })).toEqual({ amount: 25, unit: 'mL' })
    expect(dechlorinatorDose(0, { amount: 5, unit: 'mL', perLitres: 400 })).toEqual({ amount: 0, unit: 'mL' })
    expect(doseFromLabelRate(10_000, { amount: 30, unit: 'g', perLitres: 1000 }).amount).toBeCloseTo(300, 12)
  })
})

describe('water changes (C: dilution)', () => {
  it('fraction = 1 − target/current', () => {
    expect(waterChangeFraction(1, 0.25)).toBeCloseTo(0.75, 12)
    expect(waterChangeFraction(0.5, 0.1)).toBeCloseTo(0.8, 12)
    expect(waterChangeFraction(0.1, 0.5)).toBe(0)
    expect(waterChangeFraction(0, 0)).toBe(0)
    expect(waterChangeFraction(1, 0)).toBe(1)
  })
  it('changes of a third each: 1.0 → 0.25 takes 4 (⅔⁴ = 0.198), 1.0 → 0.3 takes 3 (⅔³ = 0.296)', () => {
    expect(waterChangesNeeded(1, 0.25)).toBe(4)
    expect(waterChangesNeeded(1, 0.3)).toBe(3)
    expect(waterChangesNeeded(1, 1)).toBe(0)
    expect(waterChangesNeeded(1, 0)).toBe(Infinity)
  })
  it('property: replacing the fraction with clean water reaches the target', () => {
    fc.assert(fc.property(fc.double({ min: 0.001, max: 100, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (c, k) => {
      const t = c * k
      const f = waterChangeFraction(c, t)
      expect(f).toBeGreaterThanOrEqual(0)
      expect(f).toBeLessThanOrEqual(1)
      expect(c * (1 - f)).toBeCloseTo(t, 9)
    }))
  })
})

describe('turnover, top-ups and water loss', () => {
  it('turnover = pump flow / volume', () => {
    expect(turnoverPerHour(6000, 12_000)).toBeCloseTo(0.5, 12)
    expect(turnoverPerHour(usGallonsToLitres(1000), usGallonsToLitres(1000))).toBeCloseTo(1, 12)
  })
  it('1 L over 1 m² = 1 mm; 1 in over 1 ft² = 0.6234 US gal (C)', () => {
    expect(topUpLitresToMm(250, 10)).toBeCloseTo(25, 12)
    expect(mmToTopUpLitres(25, 10)).toBeCloseTo(250, 12)
    expect(litresToUsGallons(mmToTopUpLitres(inchesToMm(1), squareFeetToSquareMetres(1)))).toBeCloseTo(0.6234, 4)
  })
  it('daily loss from level readings, adding back top-ups made at a reading', () => {
    const readings = [
      { at: '2025-06-01T10:00:00Z', levelMm: 0, addedMm: 20 },
      { at: '2025-06-08T10:00:00Z', levelMm: -5, addedMm: 30 },
      { at: '2025-06-15T10:00:00Z', levelMm: -10 },
    ]
    // fell 10 mm net with 50 mm added in between: 60 mm over 14 days
    expect(dailyWaterLossMm(readings)).toBeCloseTo(60 / 14, 12)
    // order does not matter, Date objects work
    expect(dailyWaterLossMm([...readings].reverse().map(r => ({ ...r, at: new Date(r.at) })))).toBeCloseTo(60 / 14, 12)
  })
  it('a rising level is a negative loss; too few readings or no elapsed time gives null', () => {
    expect(dailyWaterLossMm([{ at: '2025-06-01T00:00:00Z', levelMm: 0 }, { at: '2025-06-03T00:00:00Z', levelMm: 10 }])).toBeCloseTo(-5, 12)
    expect(dailyWaterLossMm([{ at: '2025-06-01T00:00:00Z', levelMm: 0 }])).toBeNull()
    expect(dailyWaterLossMm([])).toBeNull()
    expect(dailyWaterLossMm([{ at: '2025-06-01T00:00:00Z', levelMm: 0 }, { at: '2025-06-01T00:00:00Z', levelMm: 10 }])).toBeNull()
  })
  it('rejects a bad date or a negative top-up', () => {
    expect(() => dailyWaterLossMm([{ at: 'yesterday-ish', levelMm: 0 }, { at: '2025-06-01', levelMm: 1 }])).toThrow(WaterInputError)
    try {
      dailyWaterLossMm([{ at: '2025-06-01', levelMm: 0, addedMm: -3 }, { at: '2025-06-02', levelMm: 1 }])
      throw new Error('did not throw')
    } catch (e) { expect((e as WaterInputError).field).toBe('levelReadings[0].addedMm') }
  })
})

describe("the product's stated defaults — common practice, no source (CHECKS.md §8)", () => {
  it('evaporation allowance is about 1 inch (25.4 mm) a week', () => {
    expect(EVAPORATION_ALLOWANCE_MM_PER_DAY).toBeCloseTo(3.6286, 4)
    expect(EVAPORATION_ALLOWANCE_MM_PER_DAY * 7).toBeCloseTo(25.4, 12)
  })
  it('water loss: watch above the allowance, act above twice it', () => {
    expect(waterLossStatus(-2)).toBe('ok')
    expect(waterLossStatus(3.6)).toBe('ok')
    expect(waterLossStatus(3.7)).toBe('watch')
    expect(waterLossStatus(7.2)).toBe('watch')
    expect(waterLossStatus(7.3)).toBe('act')
    expect(waterLossStatus(6, 2)).toBe('act')
    expect(waterLossStatus(3, 2)).toBe('watch')
  })
  it('turnover targets: once an hour for fish ponds, about every two hours for water gardens', () => {
    expect(TURNOVER_TARGET_PER_HOUR.koi_pond).toBe(1)
    expect(TURNOVER_TARGET_PER_HOUR.water_garden).toBe(0.5)
  })
  it('waterfall flow about 100–150 US gal/h per inch of spillway', () => {
    expect(WATERFALL_US_GPH_PER_INCH).toEqual({ low: 100, high: 150 })
    const f = waterfallFlowLph(0.3048) // 12 in
    expect(f.low).toBeCloseTo(usGallonsToLitres(1200), 6)
    expect(f.high).toBeCloseTo(usGallonsToLitres(1800), 6)
  })
  it('split limits: a third of the water per change, about 1 dKH of KH rise per day', () => {
    expect(MAX_WATER_CHANGE_FRACTION).toBeCloseTo(1 / 3, 12)
    expect(MAX_KH_RISE_DKH_PER_DAY).toBe(1)
  })
})

describe('dosing is linear in volume (fast-check)', () => {
  const vol = fc.double({ min: 0, max: 1e6, noNaN: true })
  const dkh = fc.double({ min: 0, max: 30, noNaN: true })
  const ppt = fc.double({ min: 0, max: 35, noNaN: true })
  const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(b)))

  it('bicarbonate', () => {
    fc.assert(fc.property(vol, dkh, dkh, (v, a, b) => {
      const g = bicarbonateForKH(v, a, b)
      expect(Number.isFinite(g)).toBe(true)
      expect(g).toBeGreaterThanOrEqual(0)
      close(bicarbonateForKH(2 * v, a, b), 2 * g)
    }))
  })
  it('salt', () => {
    fc.assert(fc.property(vol, ppt, ppt, (v, a, b) => {
      const kg = saltToTarget(v, a, b)
      expect(Number.isFinite(kg)).toBe(true)
      close(saltToTarget(2 * v, a, b), 2 * kg)
    }))
  })
  it('dechlorinator', () => {
    fc.assert(fc.property(vol, fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 1, max: 10_000, noNaN: true }), (v, amount, per) => {
      const rate = { amount, unit: 'mL', perLitres: per }
      close(dechlorinatorDose(2 * v, rate).amount, 2 * dechlorinatorDose(v, rate).amount)
    }))
  })
})

describe('dosing input range (WaterInputError)', () => {
  const field = (fn: () => unknown) => {
    try { fn() } catch (e) { expect(e).toBeInstanceOf(WaterInputError); return (e as WaterInputError).field }
    throw new Error('did not throw')
  }
  it('names the field', () => {
    expect(field(() => bicarbonateForKH(-1, 1, 2))).toBe('volumeL')
    expect(field(() => bicarbonateForKH(100, -1, 2))).toBe('fromDKH')
    expect(field(() => saltToTarget(Number.NaN, 1, 2))).toBe('volumeL')
    expect(field(() => saltToTarget(100, 1, -2))).toBe('targetPpt')
    expect(field(() => dechlorinatorDose(-5, { amount: 1, unit: 'mL', perLitres: 100 }))).toBe('topUpLitres')
    expect(field(() => dechlorinatorDose(5, { amount: 1, unit: 'mL', perLitres: 0 }))).toBe('labelRate.perLitres')
    expect(field(() => turnoverPerHour(1000, 0))).toBe('volumeL')
    expect(field(() => waterChangeFraction(-1, 0))).toBe('current')
    expect(field(() => topUpLitresToMm(10, 0))).toBe('surfaceAreaM2')
    expect(field(() => dosingSuggestions({ reading: {}, volumeL: -1, ranges: {} }))).toBe('volumeL')
    expect(field(() => dosingSuggestions({ reading: { pH: 15 }, volumeL: 1000, ranges: {} }))).toBe('pH')
  })
})

describe('dosingSuggestions', () => {
  const koi = DEFAULT_PROFILES.koi_pond.ranges
  const common = (s: DosingSuggestion) => {
    expect(s.cautions).toContain('Read and follow the product label')
    expect(s.cautions).toContain('Keep chemicals away from children and pets')
  }

  it('KH below target → sodium bicarbonate to the target, amount as bicarbonateForKH, split by 1 dKH a day', () => {
    const reading: WaterReading = { khMgL: 60, pH: 7.4, temperatureC: 18 }
    const out = dosingSuggestions({ reading, volumeL: 5000, ranges: koi })
    expect(out.map(s => s.key)).toEqual(['kh_buffer'])
    const s = out[0]!
    expect(s.product).toBe('sodium bicarbonate (KH buffer)')
    expect(s.unit).toBe('g')
    const expected = bicarbonateForKH(5000, mgLCaCO3ToDkh(60), mgLCaCO3ToDkh(120))
    expect(s.amount).toBeCloseTo(expected, 9)
    expect(s.amount).toBeCloseTo(5 * (60 / 17.848) * 29.96, -1) // about 503 g
    expect(s.inputs).toMatchObject({ volumeL: 5000, fromKhMgL: 60, toKhMgL: 120, days: 4 })
    expect(s.inputs.fromDKH).toBeCloseTo(3.3617, 3)
    expect(s.cautions.join(' ')).toMatch(/no more than about 1 dKH \(18 mg\/L\) a day/)
    expect(s.cautions.join(' ')).toMatch(/4 daily doses/)
    common(s)
  })

  it('KH at or above target → no KH suggestion', () => {
    expect(dosingSuggestions({ reading: { khMgL: 130 }, volumeL: 5000, ranges: koi })).toEqual([])
  })

  it('KH uses watchBelow when the profile has no target', () => {
    const out = dosingSuggestions({ reading: { khMgL: 30 }, volumeL: 1000, ranges: { khMgL: { watchBelow: 60, source: 'x', sourceKind: 'common practice' } } })
    expect(out[0]!.amount).toBeCloseTo(bicarbonateForKH(1000, mgLCaCO3ToDkh(30), mgLCaCO3ToDkh(60)), 9)
  })

  it('total ammonia over its limit → a first-step water change of about a third, with the whole job in the text and inputs', () => {
    const reading: WaterReading = { totalAmmoniaMgL: 1.0, pH: 7.5, temperatureC: 20 }
    const out = dosingSuggestions({ reading, volumeL: 8000, ranges: koi })
    const s = out.find(x => x.key === 'water_change_ammonia')!
    expect(s).toBeDefined()
    // whole job: 1 − 0.1/1.0 = 90 % (koi target 0.1 mg/L as N); ⅔⁶ = 0.088 ≤ 0.1 < ⅔⁵ → 6 changes (C: dilution)
    expect(s.inputs.totalFraction).toBeCloseTo(0.9, 9)
    expect(s.inputs.steps).toBe(6)
    // the headline is the first step: a third (MAX_WATER_CHANGE_FRACTION, common practice)
    expect(s.fraction).toBeCloseTo(1 / 3, 12)
    expect(s.amount).toBeCloseTo(8000 / 3, 6)
    expect(s.unit).toBe('L')
    expect(s.amountText).toBe('2,670 L')
    expect(s.priority).toBe(2)
    expect(s.reason).toBe('Total ammonia 1 mg/L as N is above 0.25: as a first step, change about a third of the water (2,670 L); about 6 changes in all, retesting between them, to bring total ammonia down to 0.1 mg/L as N')
    expect(s.reason).not.toMatch(/90 %/)
    expect(s.cautions.join(' ')).toMatch(/[Dd]echlorinate the new water and match its temperature/)
    common(s)
  })

  it('a small water change is offered whole, as one step', () => {
    // TAN 0.3 → 0.1 needs 1 − 0.1/0.3 = 0.667 > ⅓, but TAN 0.3 with a target of 0.25: 1 − 0.25/0.3 = 16.7 %
    const ranges = { ...koi, totalAmmoniaMgL: { watchAbove: 0.28, target: 0.25, source: 'x', sourceKind: 'common practice' as const } }
    const s = dosingSuggestions({ reading: { totalAmmoniaMgL: 0.3 }, volumeL: 6000, ranges })[0]!
    expect(s.fraction).toBeCloseTo(1 - 0.25 / 0.3, 12)
    expect(s.amount).toBeCloseTo(1000, 6)
    expect(s.inputs.steps).toBe(1)
    expect(s.reason).toMatch(/change about 17 % of the water \(1,000 L\); one change should do it; retest after it/)
  })

  it('ammonia reported as NH3 gives the same water change as the same water reported as N', () => {
    const asN = dosingSuggestions({ reading: { totalAmmoniaMgL: 0.8, pH: 7.2, temperatureC: 15 }, volumeL: 3000, ranges: koi })
    const asNH3 = dosingSuggestions({ reading: { totalAmmoniaMgL: 0.8 * 17.031 / 14.007, ammoniaBasis: 'NH3', pH: 7.2, temperatureC: 15 }, volumeL: 3000, ranges: koi })
    const wc = (l: DosingSuggestion[]) => l.find(x => x.key === 'water_change_ammonia')!
    expect(wc(asNH3).inputs.totalFraction).toBeCloseTo(wc(asN).inputs.totalFraction as number, 9)
    expect(wc(asNH3).inputs.targetTanMgLasN).toBeCloseTo(wc(asN).inputs.targetTanMgLasN as number, 9)
  })

  it('NH3 over its limit at high pH, even with TAN under its own limit, aims low enough for NH3', () => {
    const reading: WaterReading = { totalAmmoniaMgL: 0.2, pH: 8.8, temperatureC: 28 }
    const nh3 = unionizedAmmonia(0.2, 8.8, 28) * 17.031 / 14.007
    expect(nh3).toBeGreaterThan(0.05)
    const s = dosingSuggestions({ reading, volumeL: 1000, ranges: koi }).find(x => x.key === 'water_change_ammonia')!
    const target = s.inputs.targetTanMgLasN as number
    expect(target).toBeLessThan(0.1)
    // at the target, NH3 is half the 0.02 mg/L watch limit
    expect(unionizedAmmonia(target, 8.8, 28) * 17.031 / 14.007).toBeCloseTo(0.01, 9)
    expect(s.inputs.totalFraction).toBeCloseTo(1 - target / 0.2, 9)
    expect(s.fraction).toBeCloseTo(Math.min(1 / 3, 1 - target / 0.2), 9)
  })

  it('nitrite over limit with fish and no salt → water change and pond salt to chloride ≥ 10 × nitrite (SRAC 462)', () => {
    const reading: WaterReading = { nitriteMgL: 0.5, saltGL: 0 }
    const out = dosingSuggestions({ reading, volumeL: 10_000, ranges: koi, fish: true })
    expect(out.map(s => s.key)).toEqual(['water_change_nitrite', 'salt_for_nitrite', 'feeding'])
    const wc = out[0]!
    expect(wc.inputs.totalFraction).toBeCloseTo(1 - 0.05 / 0.5, 9) // target = watchAbove/2
    expect(wc.fraction).toBeCloseTo(1 / 3, 9)
    const salt = out[1]!
    expect(salt.product).toBe('pond salt (sodium chloride)')
    expect(salt.unit).toBe('kg')
    // 5 mg/L chloride needs 5 / 0.6066 = 8.243 mg/L NaCl; × 10 000 L = 82.4 g
    expect(salt.amount).toBeCloseTo((5 / 0.60661) * 10_000 / 1e6, 4)
    expect(salt.inputs.targetChlorideMgL).toBeCloseTo(5, 12)
    expect(salt.amountText).toBe('82 g')
    expect(salt.cautions.join(' ')).toMatch(/harms many plants/)
    expect(salt.cautions.join(' ')).toMatch(/Some fish do not tolerate salt/)
    expect(salt.cautions.join(' ')).toMatch(/does not evaporate/)
    expect(salt.cautions.join(' ')).not.toMatch(/assumes/)
    common(salt)
  })

  it('no salt without fish, or when chloride is already enough', () => {
    expect(dosingSuggestions({ reading: { nitriteMgL: 0.5, saltGL: 0 }, volumeL: 1000, ranges: koi }).map(s => s.key)).toEqual(['water_change_nitrite', 'feeding'])
    expect(dosingSuggestions({ reading: { nitriteMgL: 0.5, saltGL: 1 }, volumeL: 1000, ranges: koi, fish: true }).map(s => s.key)).toEqual(['water_change_nitrite', 'feeding'])
  })

  it('salt not measured: the amount assumes no salt in the pond, and says to test salt first', () => {
    const out = dosingSuggestions({ reading: { nitriteMgL: 0.5 }, volumeL: 1000, ranges: koi, fish: true })
    const salt = out.find(s => s.key === 'salt_for_nitrite')!
    expect(salt.amount).toBeCloseTo((5 / 0.60661) * 1000 / 1e6, 5) // as from 0 g/L (SRAC 462: 10 × 0.5 = 5 mg/L chloride)
    expect(salt.inputs).toMatchObject({ currentSaltGL: 0, saltMeasured: 'no' })
    expect(salt.reason).toMatch(/no salt measured/)
    expect(salt.cautions[0]).toBe('Test the salt level first: this amount assumes there is no salt in the pond now')
  })

  it('top-up with a label rate → dechlorinator dose for the top-up volume', () => {
    const rate = { amount: 5, unit: 'mL', perLitres: 400 }
    const out = dosingSuggestions({ reading: {}, volumeL: 10_000, ranges: koi, topUpLitres: 1200, dechlorinatorRate: rate })
    expect(out).toHaveLength(1)
    const s = out[0]!
    expect(s.key).toBe('dechlorinator')
    expect(s.amount).toBeCloseTo(15, 12)
    expect(s.unit).toBe('mL')
    expect(s.inputs).toMatchObject({ topUpLitres: 1200, labelAmount: 5, labelUnit: 'mL', labelPerLitres: 400 })
    expect(s.cautions.join(' ')).toMatch(/chloraminated.*retest ammonia/)
    common(s)
  })

  it('top-up without a label rate → amount null and a reason asking for the rate', () => {
    const out = dosingSuggestions({ reading: {}, volumeL: 10_000, ranges: koi, topUpLitres: 1200, dechlorinatorRate: null })
    expect(out).toHaveLength(1)
    expect(out[0]!.amount).toBeNull()
    expect(out[0]!.reason).toMatch(/label rate/)
    expect(out[0]!.cautions.join(' ')).toMatch(/retest ammonia/)
    common(out[0]!)
  })

  it('nothing to suggest for good water and no top-up', () => {
    expect(dosingSuggestions({ reading: { pH: 7.6, khMgL: 140, totalAmmoniaMgL: 0, nitriteMgL: 0, temperatureC: 20 }, volumeL: 5000, ranges: koi, fish: true })).toEqual([])
  })
})

describe('input errors a person reads: the field and its label (shown beside the form field)', () => {
  const error = (fn: () => unknown) => {
    try { fn() } catch (e) { expect(e).toBeInstanceOf(WaterInputError); return [(e as WaterInputError).field, (e as Error).message] }
    throw new Error('did not throw')
  }
  const rate = { amount: 1, unit: 'mL', perLitres: 100 }
  it.each([
    [() => thiosulfatePerChlorine('chloride' as never), 'reaction', 'reaction must be "sulfate" or "tetrathionate"'],
    [() => chloramineAmmoniaNMgL(-1), 'chloramineMgL', 'Chloramine must not be negative'],
    [() => doseFromLabelRate(-1, rate), 'volumeL', 'Volume must not be negative'],
    [() => doseFromLabelRate(10, null as never), 'labelRate', 'A label rate is required'],
    [() => doseFromLabelRate(10, 'x' as never), 'labelRate', 'A label rate is required'],
    [() => doseFromLabelRate(10, { ...rate, amount: -1 }), 'labelRate.amount', 'Label amount must not be negative'],
    [() => doseFromLabelRate(10, { ...rate, perLitres: 0 }), 'labelRate.perLitres', 'Label volume must be greater than zero'],
    [() => doseFromLabelRate(10, { ...rate, unit: '  ' }), 'labelRate.unit', 'Label unit is required'],
    [() => doseFromLabelRate(10, { ...rate, unit: 5 as never }), 'labelRate.unit', 'Label unit is required'],
    [() => bicarbonateForKH(-1, 1, 2), 'volumeL', 'Volume must not be negative'],
    [() => bicarbonateForKH(1, -1, 2), 'fromDKH', 'Current KH must not be negative'],
    [() => bicarbonateForKH(1, 1, -2), 'toDKH', 'Target KH must not be negative'],
    [() => saltToTarget(-1, 0, 1), 'volumeL', 'Volume must not be negative'],
    [() => saltToTarget(1, -1, 1), 'currentPpt', 'Current salt must not be negative'],
    [() => saltToTarget(1, 0, -1), 'targetPpt', 'Target salt must not be negative'],
    [() => waterChangeFraction(-1, 0), 'current', 'Current concentration must not be negative'],
    [() => waterChangeFraction(1, -1), 'target', 'Target concentration must not be negative'],
    [() => waterChangesNeeded(-1, 0), 'current', 'Current concentration must not be negative'],
    [() => waterChangesNeeded(1, -1), 'target', 'Target concentration must not be negative'],
    [() => waterChangesNeeded(1, 0.5, Number.NaN), 'maxFraction', 'maxFraction must be a finite number'],
    [() => waterChangesNeeded(1, 0.5, 0), 'maxFraction', 'maxFraction must be between 0 and 1'],
    [() => waterChangesNeeded(1, 0.5, 1.01), 'maxFraction', 'maxFraction must be between 0 and 1'],
    [() => turnoverPerHour(-1, 10), 'totalPumpFlowLph', 'Pump flow must not be negative'],
    [() => turnoverPerHour(1, 0), 'volumeL', 'Volume must be greater than zero'],
    [() => waterfallFlowLph(0), 'spillwayWidthM', 'Spillway width must be greater than zero'],
    [() => topUpLitresToMm(-1, 1), 'litres', 'Top-up must not be negative'],
    [() => topUpLitresToMm(1, 0), 'surfaceAreaM2', 'Surface area must be greater than zero'],
    [() => mmToTopUpLitres(-1, 1), 'mm', 'Level rise must not be negative'],
    [() => mmToTopUpLitres(1, 0), 'surfaceAreaM2', 'Surface area must be greater than zero'],
    [() => dailyWaterLossMm('x' as never), 'levelReadings', 'levelReadings must be a list'],
    [() => dailyWaterLossMm([{ at: 5 as never, levelMm: 0 }]), 'levelReadings[0].at', 'Reading time is not a valid date'],
    [() => dailyWaterLossMm([{ at: '2025-06-01', levelMm: 0 }, { at: '2025-06-02', levelMm: Number.NaN }]), 'levelReadings[1].levelMm', 'Water level must be a finite number'],
    [() => dailyWaterLossMm([{ at: '2025-06-01', levelMm: 0, addedMm: -1 }]), 'levelReadings[0].addedMm', 'Water added must not be negative'],
    [() => waterLossStatus(Number.NaN), 'mmPerDay', 'Water loss must be a finite number'],
    [() => waterLossStatus(1, 0), 'allowanceMmPerDay', 'Evaporation allowance must be greater than zero'],
    [() => dosingSuggestions(null as never), 'input', 'input is required'],
    [() => dosingSuggestions('x' as never), 'input', 'input is required'],
    [() => dosingSuggestions({ reading: {}, volumeL: 0, ranges: {} }), 'volumeL', 'Volume must be greater than zero'],
    [() => dosingSuggestions({ reading: {}, volumeL: 10, ranges: {}, topUpLitres: -5 }), 'topUpLitres', 'Top-up must not be negative'],
    [() => dosingSuggestions({ reading: {}, volumeL: 10, ranges: {}, pressureKPa: 20 }), 'pressureKPa', 'Air pressure must be between 50 kPa and 110 kPa'],
  ])('%#: %s', (fn, field, message) => {
    expect(error(fn)).toEqual([field, message])
  })
  it('the dechlorinator\'s top-up names its own field', () => {
    expect(error(() => dechlorinatorDose(-1, rate))).toEqual(['topUpLitres', 'Volume must not be negative'])
  })
})

describe('water-change steps and water loss: boundaries (C: dilution; common practice for the allowance)', () => {
  it('steps at exact powers of ⅔, one full change, none needed', () => {
    expect(waterChangesNeeded(1, (2 / 3) ** 2)).toBe(2)
    expect(waterChangesNeeded(1, (2 / 3) ** 2 * 0.999)).toBe(3)
    expect(waterChangesNeeded(1, 0, 1)).toBe(1)
    expect(waterChangesNeeded(1, 0.5, 1)).toBe(1)
    expect(waterChangesNeeded(0.5, 0.5)).toBe(0)
    expect(waterChangesNeeded(1, 0.5, 0.5)).toBe(1)
  })
  it('a top-up made at the last reading is not counted (it came after the last level)', () => {
    const readings = [{ at: '2025-06-01T00:00:00Z', levelMm: 0, addedMm: 10 }, { at: '2025-06-11T00:00:00Z', levelMm: -20, addedMm: 40 }]
    expect(dailyWaterLossMm(readings)).toBeCloseTo(3, 12) // (0 − (−20) + 10) / 10 days
    expect(dailyWaterLossMm([{ at: '2025-06-01T00:00:00Z', levelMm: 0, addedMm: null as never }, { at: '2025-06-02T00:00:00Z', levelMm: -1 }])).toBeCloseTo(1, 12)
  })
  it('loss exactly at the allowance is ok, exactly at twice it is watch', () => {
    expect(waterLossStatus(2, 2)).toBe('ok')
    expect(waterLossStatus(4, 2)).toBe('watch')
    expect(waterLossStatus(4.0001, 2)).toBe('act')
  })
  it('bicarbonate and salt for no rise, and water changes for nothing to dilute', () => {
    expect(bicarbonateForKH(1000, 3, 3)).toBe(0)
    expect(saltToTarget(1000, 2, 2)).toBe(0)
    expect(waterChangeFraction(0.25, 0.25)).toBe(0)
  })
  it('thiosulfate: the pentahydrate carries 5 H2O (18.015 g/mol each)', () => {
    const anhydrous = thiosulfatePerChlorine('sulfate')
    expect((thiosulfatePerChlorine('sulfate', true) - anhydrous) * 4 * 70.9).toBeCloseTo(5 * 18.015, 1)
    expect(thiosulfatePerChlorine('tetrathionate', false)).toBeCloseTo(8 * anhydrous, 9) // 2 mol per Cl2 against ¼ mol
  })
})

describe('dosingSuggestions: the words and numbers of each suggestion, in each system', () => {
  const koi = DEFAULT_PROFILES.koi_pond.ranges
  const get = (l: DosingSuggestion[], k: string) => l.find(s => s.key === k)!

  it('KH buffer: reason, amount text, and the daily split in the system\'s units', () => {
    const us = dosingSuggestions({ reading: { khMgL: 60 }, volumeL: 5000, ranges: koi, unitSystem: 'us' })[0]!
    expect(us.reason).toBe('KH 60 mg/L is below the target of 120: sodium bicarbonate raises it and steadies pH')
    expect(us.amountText).toBe('1.1 lb') // 504 g / 453.59237 = 1.11 lb
    expect(us.priority).toBe(4)
    expect(us.cautions.slice(0, 3)).toEqual([
      'Raise KH by no more than about 1 dKH (18 mg/L) a day (common practice): split this into 4 daily doses of about 4.5 oz',
      'Dissolve it in a bucket of pond water and spread it around the pond',
      'Retest KH and pH the next day',
    ])
    const metric = dosingSuggestions({ reading: { khMgL: 60 }, volumeL: 5000, ranges: koi })[0]!
    expect(metric.amountText).toBe('505 g')
    expect(metric.cautions[0]).toMatch(/4 daily doses of about 125 g$/)
  })
  it('KH: exactly 2 dKH to raise takes 2 days; under 1 dKH is one dose; at the target nothing; the act level when no target', () => {
    const ranges = { khMgL: { target: 30 + dkhToMgLCaCO3(2), source: 'x', sourceKind: 'common practice' as const } }
    const two = dosingSuggestions({ reading: { khMgL: 30 }, volumeL: 1000, ranges })[0]!
    expect(two.inputs.days).toBe(2)
    const one = dosingSuggestions({ reading: { khMgL: 110 }, volumeL: 1000, ranges: koi })[0]!
    expect(one.inputs.days).toBe(1)
    expect(one.cautions[0]).toBe('Raise KH by no more than about 1 dKH (18 mg/L) a day (common practice)')
    expect(dosingSuggestions({ reading: { khMgL: 120 }, volumeL: 1000, ranges: koi })).toEqual([])
    const actOnly = dosingSuggestions({ reading: { khMgL: 10 }, volumeL: 1000, ranges: { khMgL: { actBelow: 20, source: 'x', sourceKind: 'published' } } })[0]!
    expect(actOnly.inputs.toKhMgL).toBe(20)
  })
  it('ammonia: the un-ionized wording when only NH3 is over; its inputs; the default target is half the limit', () => {
    const s = get(dosingSuggestions({ reading: { totalAmmoniaMgL: 0.2, pH: 8.8, temperatureC: 28 }, volumeL: 1000, ranges: koi }), 'water_change_ammonia')
    expect(s.reason).toMatch(/^Un-ionized ammonia 0\.\d{3} mg\/L is above 0\.02: as a first step/)
    expect(s.inputs).toMatchObject({ pH: 8.8, temperatureC: 28, currentTanMgLasN: 0.2 })
    expect(s.inputs.nh3MgL).toBeCloseTo(0.2 * unionizedAmmoniaFraction(8.8, 28) * 17.031 / 14.007, 12) // Emerson et al. 1975
    const noPh = get(dosingSuggestions({ reading: { totalAmmoniaMgL: 0.6 }, volumeL: 1000, ranges: { totalAmmoniaMgL: { watchAbove: 0.4, source: 'x', sourceKind: 'common practice' } } }), 'water_change_ammonia')
    expect(noPh.inputs.targetTanMgLasN).toBeCloseTo(0.2, 12)
    expect(Object.keys(noPh.inputs)).not.toContain('nh3MgL')
    expect(noPh.reason).toMatch(/^Total ammonia 0\.6 mg\/L as N is above 0\.4/)
    expect(get(dosingSuggestions({ reading: { totalAmmoniaMgL: 0.6, pH: 7, temperatureC: 15 }, volumeL: 1000, ranges: { nh3MgL: { watchAbove: 0.5, source: 'x', sourceKind: 'common practice' } } }), 'water_change_ammonia')).toBeUndefined()
  })
  it('ammonia exactly at its limit is not over it (strict, as the evaluation)', () => {
    const tan = 0.25
    const nh3 = tan * unionizedAmmoniaFraction(7.5, 20) * (17.031 / 14.007)
    const ranges = { totalAmmoniaMgL: { watchAbove: 0.25, source: 'x', sourceKind: 'common practice' as const }, nh3MgL: { watchAbove: nh3 * 1.0000001, source: 'x', sourceKind: 'common practice' as const } }
    expect(dosingSuggestions({ reading: { totalAmmoniaMgL: tan, pH: 7.5, temperatureC: 20 }, volumeL: 1000, ranges }).map(s => s.key)).toEqual([])
    expect(dosingSuggestions({ reading: { totalAmmoniaMgL: 0, pH: 7.5, temperatureC: 20 }, volumeL: 1000, ranges: koi })).toEqual([])
  })
  it('nitrite: the change alone, with the same water as an ammonia change, at the limit, and with a target above the reading', () => {
    const alone = get(dosingSuggestions({ reading: { nitriteMgL: 0.3 }, volumeL: 3000, ranges: koi, unitSystem: 'us' }), 'water_change_nitrite')
    expect(alone.reason).toBe('Nitrite 0.3 mg/L is above 0.1: as a first step, change about a third of the water (264 US gal); about 5 changes in all, retesting between them, to bring nitrite down to 0.05 mg/L')
    expect(alone.inputs).toMatchObject({ currentNitriteMgL: 0.3, targetNitriteMgL: 0.05, steps: 5 })
    expect(alone.product).toBe('clean water (partial water change)')
    expect(alone.cautions.slice(0, 3)).toEqual([
      'Dechlorinate the new water and match its temperature to the pond water',
      'Change no more than about a third of the water at a time (common practice)',
      'Retest after each change and find the cause (overfeeding, too many fish, or a filter that is not keeping up)',
    ])
    const both = get(dosingSuggestions({ reading: { nitriteMgL: 0.3, totalAmmoniaMgL: 0.5 }, volumeL: 3000, ranges: koi }), 'water_change_nitrite')
    expect(both.reason).toMatch(/\(the same changes as for ammonia, not extra ones\)$/)
    expect(dosingSuggestions({ reading: { nitriteMgL: 0.1 }, volumeL: 3000, ranges: koi })).toEqual([])
    const high = { nitriteMgL: { watchAbove: 0.1, target: 0.5, source: 'x', sourceKind: 'common practice' as const } }
    expect(dosingSuggestions({ reading: { nitriteMgL: 0.3 }, volumeL: 3000, ranges: high }).map(s => s.key)).toEqual(['feeding'])
  })
  it('a target of zero: several changes, never done by dilution alone', () => {
    const ranges = { nitriteMgL: { watchAbove: 0, target: 0, source: 'x', sourceKind: 'common practice' as const } }
    const s = get(dosingSuggestions({ reading: { nitriteMgL: 0.3 }, volumeL: 3000, ranges }), 'water_change_nitrite')
    expect(s.reason).toMatch(/; several changes in all, retesting between them,/)
    expect(s.inputs.steps).toBe('several')
  })
  it('salt: measured salt in the reason, the chloride it reaches (SRAC 462), and the feature\'s salt limit', () => {
    const measured = get(dosingSuggestions({ reading: { nitriteMgL: 0.5, saltGL: 0.001 }, volumeL: 10_000, ranges: koi, fish: true }), 'salt_for_nitrite')
    expect(measured.reason).toBe('Nitrite 0.5 mg/L with chloride 1 mg/L: raise chloride to at least 10 × nitrite (5 mg/L) so that nitrite harms the fish less (SRAC 462)')
    expect(measured.inputs.saltMeasured).toBe('yes')
    expect(saltGLToChlorideMgL(measured.inputs.targetSaltGL as number)).toBeCloseTo(5, 9)
    expect(measured.amount).toBeCloseTo(saltToTarget(10_000, 0.001, measured.inputs.targetSaltGL as number), 12)
    // 100 mg/L nitrite needs 1,000 mg/L chloride: 1,000 / 606.6 = 1.65 g/L salt, above a limit of 1 g/L
    const limited = { ...koi, saltGL: { watchAbove: 1, source: 'x', sourceKind: 'common practice' as const } }
    const us = get(dosingSuggestions({ reading: { nitriteMgL: 100 }, volumeL: 10_000, ranges: limited, fish: true, unitSystem: 'us' }), 'salt_for_nitrite')
    expect(us.cautions[0]).toBe('This would take salt to 0.16 %, above this feature\'s limit of 0.1 %: change water instead')
    const metric = get(dosingSuggestions({ reading: { nitriteMgL: 100 }, volumeL: 10_000, ranges: limited, fish: true }), 'salt_for_nitrite')
    expect(metric.cautions[0]).toBe('This would take salt to 1.6 g/L, above this feature\'s limit of 1 g/L: change water instead')
    expect(metric.amountText).toBe('16.5 kg')
    expect(us.amountText).toBe('36.3 lb') // 16,485 g / 453.59237
    const roomy = { ...koi, saltGL: { watchAbove: 0.0083, source: 'x', sourceKind: 'common practice' as const } } // target 0.00824 g/L
    expect(get(dosingSuggestions({ reading: { nitriteMgL: 0.5 }, volumeL: 10_000, ranges: roomy, fish: true }), 'salt_for_nitrite').cautions[0]).toMatch(/^Test the salt level first/)
  })
  it('salt: none when chloride is exactly 10 × nitrite (SRAC 462: at least 10 : 1)', () => {
    const saltGL = 0.5 // 303.3 mg/L chloride, so nitrite 30.33 mg/L (a value chosen so that 10 × nitrite is exact in floating point)
    const nitrite = saltGLToChlorideMgL(saltGL) / 10
    expect(10 * nitrite).toBe(saltGLToChlorideMgL(saltGL))
    expect(dosingSuggestions({ reading: { nitriteMgL: nitrite, saltGL }, volumeL: 1000, ranges: {}, fish: true })).toEqual([])
  })
  it('dechlorinator: the top-up and the label rate in the system\'s units', () => {
    const rate = { amount: 5, unit: 'mL', perLitres: 400 }
    const us = dosingSuggestions({ reading: {}, volumeL: 10_000, ranges: koi, topUpLitres: 1200, dechlorinatorRate: rate, unitSystem: 'us' })[0]!
    expect(us.reason).toBe('317 US gal of tap water was added: dechlorinate it at the label rate of 0.2 fl oz per 106 US gal')
    expect(us.amountText).toBe('0.5 fl oz')
    expect(us.cautions.slice(0, 2)).toEqual([
      'Add the dechlorinator as the new water goes in',
      'If the tap water is chloraminated, neutralising it releases ammonia (about 0.2 mg/L as N for each 1 mg/L of chloramine as Cl2): retest ammonia after a big top-up',
    ])
    const none = dosingSuggestions({ reading: {}, volumeL: 10_000, ranges: koi, topUpLitres: 1200, unitSystem: 'us' })[0]!
    expect(none).toMatchObject({ amount: null, unit: '', amountText: null, product: 'dechlorinator', inputs: { topUpLitres: 1200 } })
    expect(none.reason).toBe('Enter the dechlorinator\'s label rate to work out the dose for 317 US gal of top-up water')
    expect(dosingSuggestions({ reading: {}, volumeL: 10_000, ranges: koi, topUpLitres: null as never })).toEqual([])
    expect(dosingSuggestions({ reading: {}, volumeL: 10_000, ranges: koi, topUpLitres: 0, dechlorinatorRate: rate })).toEqual([])
  })
  it('a feature without ranges gets only what needs none', () => {
    const out = dosingSuggestions({ reading: { khMgL: 10, nitriteMgL: 0.5, temperatureC: 8 }, volumeL: 1000, ranges: null as never, fish: true })
    expect(out.map(s => s.key)).toEqual(['salt_for_nitrite', 'feeding'])
  })
})
