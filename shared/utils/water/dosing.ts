// Dosing, water changes, turnover and water loss for one feature. Litres, grams, kilograms, mm.
import type { DosingSuggestion, LabelRate, ParameterRange, RangeTable, WaterReading } from '../../types/water'
import { ammoniaToNitrogen, unionizedAmmoniaFraction } from './ammonia'
import { WaterInputError } from './errors'
import { NITRITE_CHLORIDE_MIN_RATIO, totalAmmoniaAsN, validateWaterReading } from './evaluate'
import {
  CACO3_EQUIVALENT_WEIGHT, CHLORIDE_MASS_FRACTION_NACL, INCH_M, MG_L_CACO3_PER_DKH, MOLAR_MASS, US_GALLON_L,
  mgLCaCO3ToDkh, saltGLToChlorideMgL,
} from './units'
import { finite, nonNegative, positive } from './validate'

// ---------------------------------------------------------------------------------------------
// Stoichiometry

/** mg of NaHCO3 per mg/L-as-CaCO3 rise per litre: 84.006 g/mol (1 eq/mol) ÷ 50.043 g/eq = 1.6787. */
export const NAHCO3_MG_PER_MG_CACO3 = MOLAR_MASS.NaHCO3 / CACO3_EQUIVALENT_WEIGHT
/** Grams of sodium bicarbonate to raise 1000 L by 1 dKH: 17.848 × 1.6787 = 29.96 g. */
export const BICARBONATE_G_PER_1000L_PER_DKH = MG_L_CACO3_PER_DKH * NAHCO3_MG_PER_MG_CACO3

const M_NA2S2O3 = 2 * 22.98977 + 2 * 32.06 + 3 * 15.999
const M_H2O = 2 * 1.008 + 15.999

/**
 * mg of sodium thiosulfate per mg of chlorine (as Cl2). Reduced to sulfate
 * (Na2S2O3 + 4 Cl2 + 5 H2O → 2 NaHSO4 + 8 HCl): 0.5575 (pentahydrate 0.8751); to tetrathionate
 * (2 Na2S2O3 + Cl2 → Na2S4O6 + 2 NaCl): 4.460 (pentahydrate 7.001). Which applies depends on the product.
 */
export function thiosulfatePerChlorine(reaction: 'sulfate' | 'tetrathionate', pentahydrate = false): number {
  const m = M_NA2S2O3 + (pentahydrate ? 5 * M_H2O : 0)
  if (reaction === 'sulfate') return m / (4 * MOLAR_MASS.Cl2)
  if (reaction === 'tetrathionate') return (2 * m) / MOLAR_MASS.Cl2
  throw new WaterInputError('reaction', 'reaction must be "sulfate" or "tetrathionate"')
}

/** NH3-N (mg/L) released when a monochloramine residual (mg/L as Cl2) is reduced: × 14.007 / 70.90 = 0.1976. */
export function chloramineAmmoniaNMgL(chloramineMgLasCl2: number): number {
  return (nonNegative(chloramineMgLasCl2, 'chloramineMgL', 'Chloramine') * MOLAR_MASS.N) / MOLAR_MASS.Cl2
}

// ---------------------------------------------------------------------------------------------
// Doses

/** A product's dose for `volumeL` of water at its label rate (linear in the volume). */
export function doseFromLabelRate(volumeL: number, labelRate: LabelRate, field = 'volumeL'): { amount: number, unit: string } {
  const v = nonNegative(volumeL, field, 'Volume')
  if (labelRate === null || typeof labelRate !== 'object') throw new WaterInputError('labelRate', 'A label rate is required')
  const amount = nonNegative(labelRate.amount, 'labelRate.amount', 'Label amount')
  const per = positive(labelRate.perLitres, 'labelRate.perLitres', 'Label volume')
  if (typeof labelRate.unit !== 'string' || labelRate.unit.trim() === '') {
    throw new WaterInputError('labelRate.unit', 'Label unit is required')
  }
  return { amount: (v * amount) / per, unit: labelRate.unit }
}

/** Dechlorinator for a top-up of `topUpLitres` at the product's label rate. */
export function dechlorinatorDose(topUpLitres: number, labelRate: LabelRate): { amount: number, unit: string } {
  return doseFromLabelRate(topUpLitres, labelRate, 'topUpLitres')
}

/** Grams of sodium bicarbonate to raise KH of `volumeL` from `fromDKH` to `toDKH`; 0 when no rise is needed. */
export function bicarbonateForKH(volumeL: number, fromDKH: number, toDKH: number): number {
  const v = nonNegative(volumeL, 'volumeL', 'Volume')
  const from = nonNegative(fromDKH, 'fromDKH', 'Current KH')
  const to = nonNegative(toDKH, 'toDKH', 'Target KH')
  if (to <= from) return 0
  return (v / 1000) * (to - from) * BICARBONATE_G_PER_1000L_PER_DKH
}

/** Kilograms of salt (NaCl) to raise `volumeL` from `currentPpt` to `targetPpt` (ppt = g/L, w/v); 0 when no rise is needed. */
export function saltToTarget(volumeL: number, currentPpt: number, targetPpt: number): number {
  const v = nonNegative(volumeL, 'volumeL', 'Volume')
  const from = nonNegative(currentPpt, 'currentPpt', 'Current salt')
  const to = nonNegative(targetPpt, 'targetPpt', 'Target salt')
  if (to <= from) return 0
  return (v * (to - from)) / 1000
}

/** Fraction (0..1) of the water to replace with clean water to dilute `current` down to `target`: 1 − target/current. */
export function waterChangeFraction(current: number, target: number): number {
  const c = nonNegative(current, 'current', 'Current concentration')
  const t = nonNegative(target, 'target', 'Target concentration')
  if (c <= t) return 0
  return 1 - t / c
}

/** How many changes of at most `maxFraction` each bring `current` down to `target` (Infinity for a target of 0). */
export function waterChangesNeeded(current: number, target: number, maxFraction = MAX_WATER_CHANGE_FRACTION): number {
  const c = nonNegative(current, 'current', 'Current concentration')
  const t = nonNegative(target, 'target', 'Target concentration')
  const f = finite(maxFraction, 'maxFraction')
  if (f <= 0 || f > 1) throw new WaterInputError('maxFraction', 'maxFraction must be between 0 and 1')
  if (c <= t) return 0
  if (f === 1) return 1
  if (t === 0) return Infinity
  return Math.ceil(Math.log(t / c) / Math.log(1 - f) - 1e-9)
}

// ---------------------------------------------------------------------------------------------
// Turnover and water loss (rules of thumb: common practice, no published source)

/** Common practice: change no more than about a third of the water at a time. */
export const MAX_WATER_CHANGE_FRACTION = 1 / 3
/** Common practice: raise KH by no more than about 1 dKH (18 mg/L as CaCO3) a day. */
export const MAX_KH_RISE_DKH_PER_DAY = 1
/** Common practice: evaporation about 1 inch (25.4 mm) a week. */
export const EVAPORATION_ALLOWANCE_MM_PER_DAY = 25.4 / 7
/** Common practice: fish ponds turn over once an hour, plant-led water gardens about every two hours. */
export const TURNOVER_TARGET_PER_HOUR = { koi_pond: 1, water_garden: 0.5 } as const
/** Common practice: about 100–150 US gal/h per inch of waterfall spillway width. */
export const WATERFALL_US_GPH_PER_INCH = { low: 100, high: 150 } as const

/** Times per hour the whole volume passes through the pumps. */
export function turnoverPerHour(totalPumpFlowLph: number, volumeL: number): number {
  const q = nonNegative(totalPumpFlowLph, 'totalPumpFlowLph', 'Pump flow')
  const v = positive(volumeL, 'volumeL', 'Volume')
  return q / v
}

/** Pump flow range, L/h, for a waterfall spillway `spillwayWidthM` wide (common practice). */
export function waterfallFlowLph(spillwayWidthM: number): { low: number, high: number } {
  const inches = positive(spillwayWidthM, 'spillwayWidthM', 'Spillway width') / INCH_M
  return { low: inches * WATERFALL_US_GPH_PER_INCH.low * US_GALLON_L, high: inches * WATERFALL_US_GPH_PER_INCH.high * US_GALLON_L }
}

/** Water level change, mm, of adding `litres` over `surfaceAreaM2` (1 L over 1 m² = 1 mm). */
export function topUpLitresToMm(litres: number, surfaceAreaM2: number): number {
  return nonNegative(litres, 'litres', 'Top-up') / positive(surfaceAreaM2, 'surfaceAreaM2', 'Surface area')
}

/** Litres to raise the level by `mm` over `surfaceAreaM2`. */
export function mmToTopUpLitres(mm: number, surfaceAreaM2: number): number {
  return nonNegative(mm, 'mm', 'Level rise') * positive(surfaceAreaM2, 'surfaceAreaM2', 'Surface area')
}

export interface WaterLevelReading { at: Date | string, levelMm: number, addedMm?: number }

/**
 * Net water loss, mm per day (positive = losing water), from the first to the last level reading
 * (sorted by time). `addedMm` on a reading is water added right after that level was read (a top-up
 * at the visit), so top-ups at every reading but the last are added back. Null with fewer than two
 * readings or no elapsed time.
 */
export function dailyWaterLossMm(levelReadings: WaterLevelReading[]): number | null {
  if (!Array.isArray(levelReadings)) throw new WaterInputError('levelReadings', 'levelReadings must be a list')
  const rows = levelReadings.map((r, i) => {
    const t = r.at instanceof Date ? r.at.getTime() : typeof r.at === 'string' ? Date.parse(r.at) : Number.NaN
    if (!Number.isFinite(t)) throw new WaterInputError(`levelReadings[${i}].at`, 'Reading time is not a valid date')
    return {
      t,
      level: finite(r.levelMm, `levelReadings[${i}].levelMm`, 'Water level'),
      added: r.addedMm === undefined || r.addedMm === null ? 0 : nonNegative(r.addedMm, `levelReadings[${i}].addedMm`, 'Water added'),
    }
  })
  if (rows.length < 2) return null
  rows.sort((a, b) => a.t - b.t)
  const first = rows[0]!
  const last = rows[rows.length - 1]!
  const days = (last.t - first.t) / 86_400_000
  if (days <= 0) return null
  const added = rows.slice(0, -1).reduce((s, r) => s + r.added, 0)
  return (first.level - last.level + added) / days
}

/** 'watch' above the evaporation allowance, 'act' above twice it (common practice). */
export function waterLossStatus(mmPerDay: number, allowanceMmPerDay: number = EVAPORATION_ALLOWANCE_MM_PER_DAY): 'ok' | 'watch' | 'act' {
  const loss = finite(mmPerDay, 'mmPerDay', 'Water loss')
  const allowance = positive(allowanceMmPerDay, 'allowanceMmPerDay', 'Evaporation allowance')
  if (loss > 2 * allowance) return 'act'
  if (loss > allowance) return 'watch'
  return 'ok'
}

// ---------------------------------------------------------------------------------------------
// Suggestions

export const DOSING_LABEL_CAUTION = 'Read and follow the product label'
export const DOSING_CHILDREN_CAUTION = 'Keep chemicals away from children and pets'
const BASE_CAUTIONS = [DOSING_LABEL_CAUTION, DOSING_CHILDREN_CAUTION]

const upperLimit = (r?: ParameterRange) => r?.watchAbove ?? r?.actAbove
const round = (v: number, digits = 3) => Number(v.toPrecision(digits))

export interface DosingSuggestionsInput {
  reading: WaterReading
  volumeL: number
  ranges: RangeTable
  topUpLitres?: number
  dechlorinatorRate?: LabelRate | null
  /** Fish live in the feature (default false: no salt is suggested without fish). */
  fish?: boolean
}

interface WaterChangeSpec {
  key: 'water_change_ammonia' | 'water_change_nitrite'
  /** Why, e.g. "Total ammonia 0.8 mg/L as N is above 0.25". */
  why: string
  /** What is being diluted, e.g. "total ammonia", and its unit. */
  what: string
  unit: string
  current: number
  target: number
  volumeL: number
  inputs: Record<string, number | string>
}

function waterChange(w: WaterChangeSpec): DosingSuggestion | null {
  const fraction = waterChangeFraction(w.current, w.target)
  if (fraction <= 0) return null
  const litres = fraction * w.volumeL
  const changes = waterChangesNeeded(w.current, w.target)
  const third = round(w.volumeL * MAX_WATER_CHANGE_FRACTION)
  const split = fraction > MAX_WATER_CHANGE_FRACTION
    ? `Change no more than about a third of the water at a time (common practice): ${Number.isFinite(changes) ? `about ${changes} changes` : 'several changes'} of up to ${third} L, retesting between them`
    : 'Change no more than about a third of the water at a time (common practice)'
  return {
    key: w.key,
    product: 'clean water (partial water change)',
    amount: litres,
    unit: 'L',
    fraction,
    reason: `${w.why}: replace about ${round(fraction * 100, 2)} % of the water (${round(litres)} L) to bring ${w.what} down to ${round(w.target)} ${w.unit}`,
    inputs: { volumeL: w.volumeL, ...w.inputs, fraction },
    cautions: [
      'Dechlorinate the new water and match its temperature to the pond water',
      split,
      'Retest after the change and find the cause (overfeeding, too many fish, or a filter that is not keeping up)',
      ...BASE_CAUTIONS,
    ],
  }
}

/**
 * Dosing advice for one reading of a feature of `volumeL` litres, against its ranges:
 * KH buffer, partial water changes for ammonia or nitrite, pond salt against nitrite (fish only),
 * and dechlorinator for a top-up. Each suggestion carries the inputs it was computed from.
 */
export function dosingSuggestions(input: DosingSuggestionsInput): DosingSuggestion[] {
  if (input === null || typeof input !== 'object') throw new WaterInputError('input', 'input is required')
  const { reading, ranges } = input
  const volumeL = positive(input.volumeL, 'volumeL', 'Volume')
  const m = validateWaterReading(reading)
  const out: DosingSuggestion[] = []

  // Ammonia: TAN over its limit, or computed NH3 over its limit.
  const tanN = totalAmmoniaAsN(reading)
  const tanR = ranges?.totalAmmoniaMgL
  const nh3R = ranges?.nh3MgL
  if (tanN !== null && tanN > 0) {
    const f = m.pH !== undefined && m.temperatureC !== undefined ? unionizedAmmoniaFraction(m.pH, m.temperatureC) : null
    const nh3 = f === null ? null : tanN * f * (MOLAR_MASS.NH3 / MOLAR_MASS.N)
    const tanLimit = upperLimit(tanR)
    const nh3Limit = upperLimit(nh3R)
    const tanOver = tanLimit !== undefined && tanN > tanLimit
    const nh3Over = nh3 !== null && nh3Limit !== undefined && nh3 > nh3Limit
    if (tanOver || nh3Over) {
      let target = tanR?.target ?? (tanLimit !== undefined ? tanLimit / 2 : undefined)
      // At high pH or temperature, aim lower so that NH3 ends at no more than half its limit.
      if (f !== null && f > 0 && nh3Limit !== undefined) {
        const forNh3 = ammoniaToNitrogen(nh3Limit / 2) / f
        target = target === undefined ? forNh3 : Math.min(target, forNh3)
      }
      if (target !== undefined) {
        const inputs: Record<string, number | string> = { currentTanMgLasN: tanN, targetTanMgLasN: target }
        if (nh3 !== null) Object.assign(inputs, { nh3MgL: nh3, pH: m.pH!, temperatureC: m.temperatureC! })
        const why = tanOver
          ? `Total ammonia ${round(tanN)} mg/L as N is above ${tanLimit}`
          : `Un-ionized ammonia ${round(nh3!)} mg/L is above ${nh3Limit}`
        const s = waterChange({
          key: 'water_change_ammonia', why, what: 'total ammonia', unit: 'mg/L as N',
          current: tanN, target, volumeL, inputs,
        })
        if (s) out.push(s)
      }
    }
  }

  // Nitrite: water change when over its limit; salt (fish only) when chloride < 10 × nitrite.
  const nitrite = m.nitriteMgL
  const nitriteR = ranges?.nitriteMgL
  if (nitrite !== undefined && nitrite > 0) {
    const limit = upperLimit(nitriteR)
    if (limit !== undefined && nitrite > limit) {
      const target = nitriteR?.target ?? limit / 2
      const s = waterChange({
        key: 'water_change_nitrite', why: `Nitrite ${round(nitrite)} mg/L is above ${limit}`, what: 'nitrite', unit: 'mg/L',
        current: nitrite, target, volumeL, inputs: { currentNitriteMgL: nitrite, targetNitriteMgL: target },
      })
      if (s) out.push(s)
    }
    if (input.fish === true && m.saltGL !== undefined) {
      const chloride = saltGLToChlorideMgL(m.saltGL)
      const neededChloride = NITRITE_CHLORIDE_MIN_RATIO * nitrite
      if (chloride < neededChloride) {
        const targetSaltGL = m.saltGL + (neededChloride - chloride) / (1000 * CHLORIDE_MASS_FRACTION_NACL)
        const kg = saltToTarget(volumeL, m.saltGL, targetSaltGL)
        const saltLimit = upperLimit(ranges?.saltGL)
        const cautions = [
          'Salt harms many plants and some fish: check what lives in the feature first',
          'Salt stays in the water when it evaporates; only water changes lower it',
          'Dissolve the salt in pond water and add it a little at a time',
        ]
        if (saltLimit !== undefined && targetSaltGL > saltLimit) {
          cautions.unshift(`This would take salt to ${round(targetSaltGL)} g/L, above this feature's limit of ${saltLimit} g/L: change water instead`)
        }
        out.push({
          key: 'salt_for_nitrite',
          product: 'pond salt (sodium chloride)',
          amount: kg,
          unit: 'kg',
          reason: `Nitrite ${round(nitrite)} mg/L with chloride ${round(chloride)} mg/L: raise chloride to at least 10 × nitrite (${round(neededChloride)} mg/L) to protect fish (SRAC 462)`,
          inputs: {
            volumeL, nitriteMgL: nitrite, currentSaltGL: m.saltGL, currentChlorideMgL: chloride,
            targetChlorideMgL: neededChloride, targetSaltGL,
          },
          cautions: [...cautions, ...BASE_CAUTIONS],
        })
      }
    }
  }

  // KH below the target (or watch level) → sodium bicarbonate to the target.
  const khR = ranges?.khMgL
  const khTarget = khR ? khR.target ?? khR.watchBelow ?? khR.actBelow : undefined
  if (m.khMgL !== undefined && khTarget !== undefined && m.khMgL < khTarget) {
    const fromDKH = mgLCaCO3ToDkh(m.khMgL)
    const toDKH = mgLCaCO3ToDkh(khTarget)
    const grams = bicarbonateForKH(volumeL, fromDKH, toDKH)
    const days = Math.max(1, Math.ceil((toDKH - fromDKH) / MAX_KH_RISE_DKH_PER_DAY - 1e-9))
    out.push({
      key: 'kh_buffer',
      product: 'sodium bicarbonate (KH buffer)',
      amount: grams,
      unit: 'g',
      reason: `KH ${round(m.khMgL)} mg/L is below the target of ${round(khTarget)} mg/L: sodium bicarbonate raises it and steadies pH`,
      inputs: { volumeL, fromKhMgL: m.khMgL, toKhMgL: khTarget, fromDKH, toDKH, days },
      cautions: [
        days > 1
          ? `Raise KH by no more than about 1 dKH (18 mg/L) a day (common practice): split this into ${days} daily doses of about ${round(grams / days)} g`
          : 'Raise KH by no more than about 1 dKH (18 mg/L) a day (common practice)',
        'Dissolve it in a bucket of pond water and spread it around the pond',
        'Retest KH and pH the next day',
        ...BASE_CAUTIONS,
      ],
    })
  }

  // Dechlorinator for a top-up.
  const topUp = input.topUpLitres === undefined || input.topUpLitres === null ? 0 : nonNegative(input.topUpLitres, 'topUpLitres', 'Top-up')
  if (topUp > 0) {
    const rate = input.dechlorinatorRate ?? null
    const cautions = [
      'Add the dechlorinator as the new water goes in',
      `If the tap water is chloraminated, neutralising it releases ammonia (about ${round(chloramineAmmoniaNMgL(1), 2)} mg/L as N for each 1 mg/L of chloramine as Cl2): retest ammonia after a big top-up`,
      ...BASE_CAUTIONS,
    ]
    if (rate) {
      const dose = dechlorinatorDose(topUp, rate)
      out.push({
        key: 'dechlorinator',
        product: 'dechlorinator',
        amount: dose.amount,
        unit: dose.unit,
        reason: `${round(topUp)} L of tap water was added: dechlorinate it at the label rate of ${rate.amount} ${rate.unit} per ${rate.perLitres} L`,
        inputs: { topUpLitres: topUp, labelAmount: rate.amount, labelUnit: rate.unit, labelPerLitres: rate.perLitres },
        cautions,
      })
    } else {
      out.push({
        key: 'dechlorinator',
        product: 'dechlorinator',
        amount: null,
        unit: '',
        reason: `Enter the dechlorinator's label rate to compute the dose for ${round(topUp)} L of top-up water`,
        inputs: { topUpLitres: topUp },
        cautions,
      })
    }
  }

  return out
}
