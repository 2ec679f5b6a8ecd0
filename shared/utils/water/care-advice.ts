// Advice without an amount, in the company's units: aeration first, feeding, and "KH once ammonia
// is down". Used by the technician's dosing suggestions (./dosing.ts). The rules and their
// thresholds live in ./rules.ts (common practice unless a source is named there).
import type { DosingSuggestion } from '../../types/water'
import { formatParameter } from './parameters'
import { formatQuantity, type UnitSystem } from './format'
import {
  ELECTRICAL_CAUTION, FEED_LIGHTLY_BELOW_C, PRIORITY, STOP_FEEDING_BELOW_C, WARM_WATER_C,
} from './rules'

/** What the water looks like, as far as aeration and feeding care. All values SI; null when not measured. */
export interface WaterState {
  temperatureC: number | null
  dissolvedOxygenMgL: number | null
  /** The level below which dissolved oxygen is low (the range's watch level, else its act level). */
  doLowMgL: number | null
  doSaturationPct: number | null
  doSaturationLowPct: number | null
  /** Un-ionized ammonia, mg/L as NH3, and its watch level. */
  nh3MgL: number | null
  nh3WatchMgL: number
  /** Total ammonia (as N) above its watch level. */
  ammoniaHigh: boolean
  /** Nitrite above its watch level. */
  nitriteHigh: boolean
  /** Total ammonia, un-ionized ammonia or nitrite above an act level. */
  ammoniaOrNitriteAct: boolean
}

/** A measured temperature ("78.8 °F") and a threshold in whole degrees ("50 °F"). */
const t = (c: number, system: UnitSystem) => formatQuantity('temperature', c, system)
const about = (c: number, system: UnitSystem) => formatQuantity('temperature', c, system, { digits: 0 })
const none = { amount: null, unit: '', amountText: null } as const

/** True when warm water and high ammonia together call for aeration (common practice). */
export const warmAndAmmonia = (w: WaterState): boolean =>
  w.temperatureC !== null && w.temperatureC >= WARM_WATER_C && (w.ammoniaHigh || (w.nh3MgL !== null && w.nh3MgL >= w.nh3WatchMgL))

/** Aeration first when oxygen or its saturation is low, or ammonia is high in warm water; else null. */
export function aerationAdvice(w: WaterState, system: UnitSystem): DosingSuggestion | null {
  const why: string[] = []
  if (w.dissolvedOxygenMgL !== null && w.doLowMgL !== null && w.dissolvedOxygenMgL < w.doLowMgL) {
    why.push(`dissolved oxygen ${formatParameter('dissolvedOxygenMgL', w.dissolvedOxygenMgL, system)} is below ${formatParameter('dissolvedOxygenMgL', w.doLowMgL, system, { bare: true })}`)
  }
  if (w.doSaturationPct !== null && w.doSaturationLowPct !== null && w.doSaturationPct < w.doSaturationLowPct) {
    why.push(`oxygen saturation ${formatParameter('doSaturationPct', w.doSaturationPct, system)} is below ${formatParameter('doSaturationPct', w.doSaturationLowPct, system)}`)
  }
  if (warmAndAmmonia(w)) {
    why.push(`the water is warm (${t(w.temperatureC!, system)}) and ammonia is high: warm water holds less oxygen while fish and the filter's bacteria need more`)
  }
  if (why.length === 0) return null
  const first = why.join('; ')
  return {
    key: 'aeration',
    product: 'aeration (air pump, waterfall or fountain)',
    ...none,
    priority: PRIORITY.oxygen,
    reason: `${first.charAt(0).toUpperCase()}${first.slice(1)}. Aerate first, before any other treatment: run an air pump or the waterfall day and night (oxygen is lowest just before dawn)`,
    inputs: {
      ...(w.temperatureC !== null ? { temperatureC: w.temperatureC } : {}),
      ...(w.dissolvedOxygenMgL !== null ? { dissolvedOxygenMgL: w.dissolvedOxygenMgL } : {}),
      ...(w.doSaturationPct !== null ? { doSaturationPct: w.doSaturationPct } : {}),
      ...(w.nh3MgL !== null ? { nh3MgL: w.nh3MgL } : {}),
    },
    cautions: [
      'Do not turn off the pump or the aerator at night',
      ELECTRICAL_CAUTION,
    ],
  }
}

/**
 * Feeding advice when ammonia or nitrite are above their watch level, or the water is cold
 * (common practice, no source: feed lightly below about 10 °C, stop below about 5 °C); else null.
 */
export function feedingAdvice(w: WaterState, system: UnitSystem): DosingSuggestion | null {
  const toxic = w.ammoniaHigh || w.nitriteHigh || (w.nh3MgL !== null && w.nh3MgL >= w.nh3WatchMgL)
  const temp = w.temperatureC
  const cold = temp !== null && temp < FEED_LIGHTLY_BELOW_C
  if (!toxic && !cold) return null
  const parts: string[] = []
  if (temp !== null && temp < STOP_FEEDING_BELOW_C) {
    parts.push(`The water is ${t(temp, system)}, below about ${about(STOP_FEEDING_BELOW_C, system)}: stop feeding until it warms up; fish cannot digest food this cold`)
  }
  else if (cold) {
    parts.push(`The water is ${t(temp!, system)}, below about ${about(FEED_LIGHTLY_BELOW_C, system)}: feed lightly, a few times a week, with an easily digested food`)
  }
  if (toxic) {
    const ammonia = w.ammoniaHigh || (w.nh3MgL !== null && w.nh3MgL >= w.nh3WatchMgL)
    const [what, is, it] = ammonia && w.nitriteHigh ? ['Ammonia and nitrite', 'are', 'they are'] : ammonia ? ['Ammonia', 'is', 'it is'] : ['Nitrite', 'is', 'it is']
    parts.push(w.ammoniaOrNitriteAct
      ? `${what} ${is} high: stop feeding for a day or two, then feed lightly (only what is eaten in a few minutes) until ${it} back in range`
      : `${what} ${is} above the watch level: feed lightly (only what is eaten in a few minutes) until ${it} back in range`)
  }
  return {
    key: 'feeding',
    product: 'feeding',
    ...none,
    priority: toxic ? PRIORITY.ammonia : PRIORITY.other,
    reason: `${parts.join('. ')} (common practice)`,
    inputs: {
      ...(temp !== null ? { temperatureC: temp } : {}),
      ...(w.nh3MgL !== null ? { nh3MgL: w.nh3MgL } : {}),
      feedLightlyBelowC: FEED_LIGHTLY_BELOW_C,
      stopFeedingBelowC: STOP_FEEDING_BELOW_C,
    },
    cautions: ['Remove food that is not eaten within a few minutes'],
  }
}

/** KH below its target while un-ionized ammonia holds it back (Emerson et al. 1975): raise it once ammonia is down. */
export function khAfterAmmoniaAdvice(
  k: { khMgL: number, targetKhMgL: number, nh3MgL: number | null, nh3WatchMgL: number },
  system: UnitSystem,
): DosingSuggestion {
  const kh = (v: number, bare = false) => formatParameter('khMgL', v, system, { bare })
  const ammonia = k.nh3MgL === null
    ? 'total ammonia is high'
    : `un-ionized ammonia ${formatParameter('nh3MgL', k.nh3MgL, system)} is at or above its watch level of ${formatParameter('nh3MgL', k.nh3WatchMgL, system, { bare: true })}`
  return {
    key: 'kh_after_ammonia',
    product: 'sodium bicarbonate (KH buffer), later',
    ...none,
    priority: PRIORITY.kh,
    reason: `KH ${kh(k.khMgL)} is below the target of ${kh(k.targetKhMgL, true)}, but do not raise it yet: ${ammonia}, and a KH buffer raises pH, which makes more of the ammonia toxic (Emerson et al. 1975). Raise KH once ammonia is down`,
    inputs: {
      khMgL: k.khMgL, targetKhMgL: k.targetKhMgL, nh3WatchMgL: k.nh3WatchMgL,
      ...(k.nh3MgL !== null ? { nh3MgL: k.nh3MgL } : {}),
    },
    cautions: ['Add no pH or KH products until ammonia is down; retest ammonia, pH and KH after each water change'],
  }
}
