// The rules of "advice that does no harm" (PRODUCT.md), shared by the technician's dosing
// suggestions, the customer's advice and the customer's dosing helper, so that all three put first
// things first in the same way: oxygen, then ammonia and nitrite, then pH stability, then KH, then
// looks. Thresholds here are common practice (no published source) unless a source is named.
import type { AdvicePriority, Parameter, RangeTable } from '../../types/water'
import { CHEMICAL_SAFETY, SAFETY_CAUTIONS } from '../safety'

/** First things first: 1 oxygen, 2 ammonia and nitrite, 3 pH stability, 4 KH, 5 looks and the rest. */
export const PRIORITY = { oxygen: 1, ammonia: 2, ph: 3, kh: 4, other: 5 } as const satisfies Record<string, AdvicePriority>

/**
 * Priority of advice about one parameter. Chlorine ranks with ammonia and nitrite: it is a poison
 * to fish and to the filter's bacteria, and chloramine releases ammonia when neutralised.
 * Warm water ranks with oxygen (it holds less of it); cold water is about feeding (the rest).
 */
export function parameterPriority(parameter: Parameter, high = true): AdvicePriority {
  switch (parameter) {
    case 'dissolvedOxygenMgL':
    case 'doSaturationPct':
      return PRIORITY.oxygen
    case 'totalAmmoniaMgL':
    case 'nh3MgL':
    case 'nitriteMgL':
    case 'chlorineMgL':
      return PRIORITY.ammonia
    case 'pH':
      return PRIORITY.ph
    case 'khMgL':
      return PRIORITY.kh
    case 'temperatureC':
      return high ? PRIORITY.oxygen : PRIORITY.other
    default:
      return PRIORITY.other
  }
}

/**
 * Un-ionized ammonia (mg/L as NH3) at which pH and KH raisers wait, when a feature's ranges have
 * no watch level of their own: the 0.02 mg/L chronic limit (common practice; CHECKS.md §7).
 */
export const DEFAULT_NH3_WATCH_MGL = 0.02

/** Common practice, no source: feed lightly (a few times a week, easily digested food) below about 10 °C (50 °F). */
export const FEED_LIGHTLY_BELOW_C = 10
/** Common practice, no source: stop feeding below about 5 °C (41 °F); fish cannot digest food that cold. */
export const STOP_FEEDING_BELOW_C = 5
/**
 * Common practice, no source: above about 25 °C (77 °F, the top of the range koi are comfortable in,
 * CHECKS.md §7) water holds little oxygen while fish and bacteria need more, so high ammonia in
 * warm water calls for aeration first.
 */
export const WARM_WATER_C = 25

/** The watch level of un-ionized ammonia in a range table (its own, else the default). */
export function nh3WatchLevel(ranges?: RangeTable | null): number {
  const r = ranges?.nh3MgL
  return r?.watchAbove ?? r?.actAbove ?? DEFAULT_NH3_WATCH_MGL
}

/**
 * True while un-ionized ammonia is at or above its watch level: then nothing that raises pH or KH
 * may be suggested, because a higher pH raises the toxic un-ionized fraction (Emerson et al. 1975).
 * When NH3 could not be computed (no pH or temperature), high total ammonia holds KH back too.
 */
export function ammoniaHoldsBackKh(nh3MgL: number | null | undefined, nh3WatchMgL: number | null | undefined, totalAmmoniaHigh = false): boolean {
  if (nh3MgL === null || nh3MgL === undefined) return totalAmmoniaHigh
  return nh3MgL >= (nh3WatchMgL ?? DEFAULT_NH3_WATCH_MGL)
}

/** Safety cautions shown wherever a chemical is dosed (the one list: shared/utils/safety.ts). */
export const SAFETY = {
  label: SAFETY_CAUTIONS.label,
  children: SAFETY_CAUTIONS.children,
  gloves: SAFETY_CAUTIONS.gloves,
  neverMix: SAFETY_CAUTIONS.neverMix,
} as const

/** Every dosed chemical carries these four, in this order. */
export const CHEMICAL_CAUTIONS: readonly string[] = CHEMICAL_SAFETY

/** Salt's cautions (PRODUCT.md, Safety; standing levels are common practice, CHECKS.md §5). */
export const SALT_CAUTIONS = {
  plants: 'Salt harms many plants: check what grows in the feature first',
  fish: 'Some fish do not tolerate salt (some catfish, sturgeon and others): do not salt a pond that holds them',
  stays: 'Salt does not evaporate; only water changes lower it',
  dissolve: 'Dissolve the salt in pond water and add it a little at a time',
} as const

/** Medication cautions, for any treatment of the fish (PRODUCT.md, Safety). */
export const MEDICATION_CAUTIONS = {
  bacteria: SAFETY_CAUTIONS.bacteriaMedication,
  uv: SAFETY_CAUTIONS.uvMedication,
} as const

/** Electrical safety for pumps and aerators beside water (PRODUCT.md, Safety). */
export const ELECTRICAL_CAUTION = SAFETY_CAUTIONS.electrical

/** Water change cautions (PRODUCT.md, "Advice that does no harm"). */
export const WATER_CHANGE_CAUTIONS = {
  dechlorinate: 'Dechlorinate the new water and match its temperature to the pond water',
  cause: 'Retest after each change and find the cause (overfeeding, too many fish, or a filter that is not keeping up)',
} as const

/** "Call us today on 555-0142." with the company's number; without one, a form that promises none. */
export function callUsToday(phone?: string | null): string {
  const p = phone?.trim()
  return p ? `Call us today on ${p}.` : 'Call your pond company today.'
}
