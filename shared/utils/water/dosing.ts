// Dosing, water changes, turnover and water loss for one feature. Litres, grams, kilograms, mm.
import type { DosingSuggestion, LabelRate, ParameterRange, RangeTable, WaterReading } from '../../types/water'
import { ammoniaToNitrogen, unionizedAmmoniaFraction } from './ammonia'
import { aerationAdvice, feedingAdvice, khAfterAmmoniaAdvice, type WaterState } from './care-advice'
import { WaterInputError } from './errors'
import { NITRITE_CHLORIDE_MIN_RATIO, totalAmmoniaAsN, validateWaterReading, type Measured } from './evaluate'
import { formatAmount, formatDose, formatNumber, formatQuantity, type UnitSystem } from './format'
import { oxygenPercentSaturation } from './oxygen'
import { formatParameter } from './parameters'
import {
  ammoniaHoldsBackKh, CHEMICAL_CAUTIONS, nh3WatchLevel, PRIORITY, SAFETY, SALT_CAUTIONS, WATER_CHANGE_CAUTIONS,
} from './rules'
import {
  CACO3_EQUIVALENT_WEIGHT, CHLORIDE_MASS_FRACTION_NACL, INCH_M, MG_L_CACO3_PER_DKH, MOLAR_MASS, US_GALLON_L,
  mgLCaCO3ToDkh, saltGLToChlorideMgL,
} from './units'
import { checkPressureKPa, finite, nonNegative, positive } from './validate'

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
// Suggestions: first things first (./rules.ts), every figure a person reads in the company's units.

export const DOSING_LABEL_CAUTION = SAFETY.label
export const DOSING_CHILDREN_CAUTION = SAFETY.children

const upperLimit = (r?: ParameterRange) => r?.watchAbove ?? r?.actAbove
const lowerLimit = (r?: ParameterRange) => r?.watchBelow ?? r?.actBelow
const round = (v: number, digits = 3) => Number(v.toPrecision(digits))
const pct = (f: number) => `${formatNumber(f * 100, 0)} %`

export interface DosingSuggestionsInput {
  reading: WaterReading
  volumeL: number
  ranges: RangeTable
  topUpLitres?: number
  dechlorinatorRate?: LabelRate | null
  /** Fish live in the feature (default false: no salt is suggested without fish). */
  fish?: boolean
  /** The company's unit system for every sentence (default 'metric'); amounts and inputs stay SI. */
  unitSystem?: UnitSystem
  /** Station pressure for the oxygen saturation (default sea level). */
  pressureKPa?: number
}

interface WaterChangeSpec {
  key: 'water_change_ammonia' | 'water_change_nitrite'
  /** Why, e.g. "Total ammonia 0.8 mg/L as N is above 0.25". */
  why: string
  /** What is being diluted and its target in words, e.g. "total ammonia down to 0.1 mg/L as N". */
  toTarget: string
  current: number
  target: number
  volumeL: number
  inputs: Record<string, number | string>
  system: UnitSystem
  /** Another water change already offered for the same reading (the same water serves both). */
  alongside?: string
}

/**
 * A partial water change offered as its first step: at most about a third of the volume
 * (MAX_WATER_CHANGE_FRACTION, common practice), with how many steps the whole job takes and a
 * retest between them. `fraction` and `amount` are the first step's; the whole job is in `inputs`.
 */
function waterChange(w: WaterChangeSpec): DosingSuggestion | null {
  const total = waterChangeFraction(w.current, w.target)
  if (total <= 0) return null
  const steps = waterChangesNeeded(w.current, w.target)
  const first = Math.min(total, MAX_WATER_CHANGE_FRACTION)
  const litres = first * w.volumeL
  const amountText = formatAmount('volume', litres, w.system)
  const stepsText = steps === 1
    ? 'one change should do it; retest after it'
    : `${Number.isFinite(steps) ? `about ${steps} changes` : 'several changes'} in all, retesting between them`
  const share = first >= MAX_WATER_CHANGE_FRACTION ? 'about a third' : `about ${pct(first)}`
  return {
    key: w.key,
    product: 'clean water (partial water change)',
    amount: litres,
    unit: 'L',
    amountText,
    priority: PRIORITY.ammonia,
    fraction: first,
    reason: `${w.why}: as a first step, change ${share} of the water (${amountText}); ${stepsText}, to bring ${w.toTarget}${w.alongside ? ` (the same changes as for ${w.alongside}, not extra ones)` : ''}`,
    inputs: { volumeL: w.volumeL, ...w.inputs, firstFraction: first, totalFraction: total, steps: Number.isFinite(steps) ? steps : 'several' },
    cautions: [
      WATER_CHANGE_CAUTIONS.dechlorinate,
      'Change no more than about a third of the water at a time (common practice)',
      WATER_CHANGE_CAUTIONS.cause,
      ...CHEMICAL_CAUTIONS,
    ],
  }
}

/** The measured values of a reading, and what the ranges make of ammonia, nitrite and oxygen. */
function waterState(input: DosingSuggestionsInput, m: Measured, tanN: number | null): WaterState & { nh3Fraction: number | null } {
  const { ranges } = input
  const f = tanN !== null && m.pH !== undefined && m.temperatureC !== undefined ? unionizedAmmoniaFraction(m.pH, m.temperatureC) : null
  const nh3 = f === null ? null : tanN! * f * (MOLAR_MASS.NH3 / MOLAR_MASS.N)
  const over = (v: number | null | undefined, limit: number | undefined) => v != null && limit !== undefined && v > limit
  const pressure = input.pressureKPa === undefined ? undefined : checkPressureKPa(input.pressureKPa)
  const sat = m.dissolvedOxygenMgL !== undefined && m.temperatureC !== undefined ? oxygenPercentSaturation(m.dissolvedOxygenMgL, m.temperatureC, pressure) : null
  return {
    temperatureC: m.temperatureC ?? null,
    dissolvedOxygenMgL: m.dissolvedOxygenMgL ?? null,
    doLowMgL: lowerLimit(ranges.dissolvedOxygenMgL) ?? null,
    doSaturationPct: sat,
    doSaturationLowPct: lowerLimit(ranges.doSaturationPct) ?? null,
    nh3MgL: nh3,
    nh3WatchMgL: nh3WatchLevel(ranges),
    nh3Fraction: f,
    ammoniaHigh: over(tanN, upperLimit(ranges.totalAmmoniaMgL)),
    nitriteHigh: over(m.nitriteMgL, upperLimit(ranges.nitriteMgL)),
    ammoniaOrNitriteAct: over(tanN, ranges.totalAmmoniaMgL?.actAbove) || over(nh3, ranges.nh3MgL?.actAbove) || over(m.nitriteMgL, ranges.nitriteMgL?.actAbove),
  }
}

function ammoniaChange(input: DosingSuggestionsInput, w: ReturnType<typeof waterState>, tanN: number | null, m: Measured, system: UnitSystem): DosingSuggestion | null {
  const tanR = input.ranges.totalAmmoniaMgL
  const nh3R = input.ranges.nh3MgL
  const tanLimit = upperLimit(tanR)
  const nh3Limit = upperLimit(nh3R)
  const f = w.nh3Fraction
  const nh3Over = w.nh3MgL !== null && nh3Limit !== undefined && w.nh3MgL > nh3Limit
  // Either means total ammonia was measured (NH3 is computed from it).
  if (tanN === null || (!w.ammoniaHigh && !nh3Over)) return null
  let target = tanR?.target ?? (tanLimit !== undefined ? tanLimit / 2 : undefined)
  // At high pH or temperature, aim lower so that NH3 ends at no more than half its limit.
  if (f !== null && nh3Limit !== undefined) {
    const forNh3 = ammoniaToNitrogen(nh3Limit / 2) / f
    target = target === undefined ? forNh3 : Math.min(target, forNh3)
  }
  if (target === undefined) return null
  const inputs: Record<string, number | string> = { currentTanMgLasN: tanN, targetTanMgLasN: target }
  if (w.nh3MgL !== null) Object.assign(inputs, { nh3MgL: w.nh3MgL, pH: m.pH!, temperatureC: m.temperatureC! })
  const tan = (v: number) => `${formatParameter('totalAmmoniaMgL', v, system)} as N`
  const why = w.ammoniaHigh
    ? `Total ammonia ${tan(tanN)} is above ${formatParameter('totalAmmoniaMgL', tanLimit!, system, { bare: true })}`
    : `Un-ionized ammonia ${formatParameter('nh3MgL', w.nh3MgL!, system)} is above ${formatParameter('nh3MgL', nh3Limit!, system, { bare: true })}`
  return waterChange({
    key: 'water_change_ammonia', why, toTarget: `total ammonia down to ${tan(target)}`,
    current: tanN, target, volumeL: input.volumeL, inputs, system,
  })
}

function nitriteSuggestions(input: DosingSuggestionsInput, m: Measured, volumeL: number, system: UnitSystem, ammoniaChangeOffered: boolean): DosingSuggestion[] {
  const out: DosingSuggestion[] = []
  const nitrite = m.nitriteMgL
  const nitriteR = input.ranges.nitriteMgL
  if (nitrite === undefined) return out
  const mgL = (v: number, bare = false) => formatParameter('nitriteMgL', v, system, { bare })
  const limit = upperLimit(nitriteR)
  if (limit !== undefined && nitrite > limit) {
    const target = nitriteR?.target ?? limit / 2
    const s = waterChange({
      key: 'water_change_nitrite', why: `Nitrite ${mgL(nitrite)} is above ${mgL(limit, true)}`, toTarget: `nitrite down to ${mgL(target)}`,
      current: nitrite, target, volumeL, inputs: { currentNitriteMgL: nitrite, targetNitriteMgL: target }, system,
      alongside: ammoniaChangeOffered ? 'ammonia' : undefined,
    })
    if (s) out.push(s)
  }
  if (input.fish !== true) return out
  // Keep chloride at least 10 × nitrite (SRAC 462). Without a salt reading, assume no salt yet.
  const measuredSalt = m.saltGL !== undefined
  const saltGL = m.saltGL ?? 0
  const chloride = saltGLToChlorideMgL(saltGL)
  const neededChloride = NITRITE_CHLORIDE_MIN_RATIO * nitrite
  if (chloride >= neededChloride) return out
  const targetSaltGL = saltGL + (neededChloride - chloride) / (1000 * CHLORIDE_MASS_FRACTION_NACL)
  const kg = saltToTarget(volumeL, saltGL, targetSaltGL)
  const saltLimit = upperLimit(input.ranges.saltGL)
  const cl = (v: number) => formatQuantity('concentration', v, system, { digits: 0 })
  const cautions: string[] = []
  if (saltLimit !== undefined && targetSaltGL > saltLimit) {
    cautions.push(`This would take salt to ${formatParameter('saltGL', targetSaltGL, system)}, above this feature's limit of ${formatParameter('saltGL', saltLimit, system)}: change water instead`)
  }
  if (!measuredSalt) cautions.push('Test the salt level first: this amount assumes there is no salt in the pond now')
  cautions.push(SALT_CAUTIONS.plants, SALT_CAUTIONS.fish, SALT_CAUTIONS.stays, SALT_CAUTIONS.dissolve, ...CHEMICAL_CAUTIONS)
  const chlorideNow = measuredSalt ? `chloride ${cl(chloride)}` : 'no salt measured (this assumes none in the pond; test salt first)'
  out.push({
    key: 'salt_for_nitrite',
    product: 'pond salt (sodium chloride)',
    amount: kg,
    unit: 'kg',
    amountText: formatAmount('mass', kg * 1000, system),
    priority: PRIORITY.ammonia,
    reason: `Nitrite ${mgL(nitrite)} with ${chlorideNow}: raise chloride to at least 10 × nitrite (${cl(neededChloride)}) so that nitrite harms the fish less (SRAC 462)`,
    inputs: {
      volumeL, nitriteMgL: nitrite, currentSaltGL: saltGL, saltMeasured: measuredSalt ? 'yes' : 'no', currentChlorideMgL: chloride,
      targetChlorideMgL: neededChloride, targetSaltGL,
    },
    cautions,
  })
  return out
}

function khSuggestion(input: DosingSuggestionsInput, m: Measured, w: ReturnType<typeof waterState>, volumeL: number, system: UnitSystem): DosingSuggestion | null {
  const khR = input.ranges.khMgL
  const khTarget = khR ? khR.target ?? khR.watchBelow ?? khR.actBelow : undefined
  if (m.khMgL === undefined || khTarget === undefined || m.khMgL >= khTarget) return null
  // No pH or KH raiser while un-ionized ammonia is at or above its watch level (Emerson et al. 1975).
  if (ammoniaHoldsBackKh(w.nh3MgL, w.nh3WatchMgL, w.ammoniaHigh)) {
    return khAfterAmmoniaAdvice({ khMgL: m.khMgL, targetKhMgL: khTarget, nh3MgL: w.nh3MgL, nh3WatchMgL: w.nh3WatchMgL }, system)
  }
  const fromDKH = mgLCaCO3ToDkh(m.khMgL)
  const toDKH = mgLCaCO3ToDkh(khTarget)
  const grams = bicarbonateForKH(volumeL, fromDKH, toDKH)
  const days = Math.max(1, Math.ceil((toDKH - fromDKH) / MAX_KH_RISE_DKH_PER_DAY - 1e-9))
  const kh = (v: number, bare = false) => formatParameter('khMgL', v, system, { bare })
  return {
    key: 'kh_buffer',
    product: 'sodium bicarbonate (KH buffer)',
    amount: grams,
    unit: 'g',
    amountText: formatAmount('mass', grams, system),
    priority: PRIORITY.kh,
    reason: `KH ${kh(m.khMgL)} is below the target of ${kh(khTarget, true)}: sodium bicarbonate raises it and steadies pH`,
    inputs: { volumeL, fromKhMgL: m.khMgL, toKhMgL: khTarget, fromDKH, toDKH, days },
    cautions: [
      days > 1
        ? `Raise KH by no more than about 1 dKH (18 mg/L) a day (common practice): split this into ${days} daily doses of about ${formatAmount('mass', grams / days, system)}`
        : 'Raise KH by no more than about 1 dKH (18 mg/L) a day (common practice)',
      'Dissolve it in a bucket of pond water and spread it around the pond',
      'Retest KH and pH the next day',
      ...CHEMICAL_CAUTIONS,
    ],
  }
}

function dechlorinatorSuggestion(input: DosingSuggestionsInput, system: UnitSystem): DosingSuggestion | null {
  const topUp = input.topUpLitres === undefined || input.topUpLitres === null ? 0 : nonNegative(input.topUpLitres, 'topUpLitres', 'Top-up')
  if (topUp <= 0) return null
  const rate = input.dechlorinatorRate ?? null
  const water = formatAmount('volume', topUp, system)
  const cautions = [
    'Add the dechlorinator as the new water goes in',
    `If the tap water is chloraminated, neutralising it releases ammonia (about ${round(chloramineAmmoniaNMgL(1), 2)} mg/L as N for each 1 mg/L of chloramine as Cl2): retest ammonia after a big top-up`,
    ...CHEMICAL_CAUTIONS,
  ]
  const base = { key: 'dechlorinator', product: 'dechlorinator', priority: PRIORITY.ammonia, cautions } as const
  if (!rate) {
    return { ...base, cautions: [...cautions], amount: null, unit: '', amountText: null, reason: `Enter the dechlorinator's label rate to work out the dose for ${water} of top-up water`, inputs: { topUpLitres: topUp } }
  }
  const dose = dechlorinatorDose(topUp, rate)
  return {
    ...base,
    cautions: [...cautions],
    amount: dose.amount,
    unit: dose.unit,
    amountText: formatDose(dose.amount, dose.unit, system),
    reason: `${water} of tap water was added: dechlorinate it at the label rate of ${formatDose(rate.amount, rate.unit, system)} per ${formatAmount('volume', rate.perLitres, system)}`,
    inputs: { topUpLitres: topUp, labelAmount: rate.amount, labelUnit: rate.unit, labelPerLitres: rate.perLitres },
  }
}

/**
 * Dosing advice for one reading of a feature of `volumeL` litres, against its ranges, first things
 * first (sorted by `priority`): aeration, partial water changes for ammonia or nitrite, pond salt
 * against nitrite (fish only), feeding, KH buffer (or, while un-ionized ammonia is at or above its
 * watch level, the advice to raise KH once ammonia is down) and dechlorinator for a top-up. Each
 * suggestion carries the SI inputs it was computed from; its sentences are in `unitSystem`.
 */
export function dosingSuggestions(input: DosingSuggestionsInput): DosingSuggestion[] {
  if (input === null || typeof input !== 'object') throw new WaterInputError('input', 'input is required')
  const system: UnitSystem = input.unitSystem ?? 'metric'
  const volumeL = positive(input.volumeL, 'volumeL', 'Volume')
  if (input.ranges == null) input = { ...input, ranges: {} }
  const m = validateWaterReading(input.reading)
  const tanN = totalAmmoniaAsN(input.reading)
  const w = waterState(input, m, tanN)

  const out: DosingSuggestion[] = []
  const add = (s: DosingSuggestion | null) => { if (s) out.push(s) }
  add(aerationAdvice(w, system))
  add(ammoniaChange({ ...input, volumeL }, w, tanN, m, system))
  out.push(...nitriteSuggestions(input, m, volumeL, system, out.some(s => s.key === 'water_change_ammonia')))
  add(feedingAdvice(w, system))
  add(khSuggestion(input, m, w, volumeL, system))
  add(dechlorinatorSuggestion(input, system))
  // A stable sort keeps the order above within one priority.
  return out.sort((a, b) => a.priority - b.priority)
}
