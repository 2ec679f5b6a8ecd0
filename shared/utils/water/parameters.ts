// The one catalogue of water parameters: key, label, the SI unit a value is stored in, what kind
// of quantity it is (so the unit formatter shows it in the company's units), digits, chart group
// and order. Forms, charts, the portal, CSV, e-mails and PDFs all read it.
import type { Parameter } from '../../types/water'
import { digitsFor, formatQuantity, fromDisplay, toDisplay, unitFor, type QuantityKind, type UnitSystem } from './format'

/** Everything a water test can hold or the engine computes, in the order people read them. */
export const READING_KEYS = [
  'temperatureC', 'pH', 'totalAmmoniaMgL', 'nh3MgL', 'nitriteMgL', 'nitrateMgL', 'khMgL', 'ghMgL',
  'dissolvedOxygenMgL', 'doSaturationPct', 'saltGL', 'chlorineMgL', 'phosphateMgL', 'waterLevelMm',
] as const
export type ReadingKey = (typeof READING_KEYS)[number]

/** Charts that draw more than one parameter share a group. */
export type ChartGroup = 'temperature' | 'ph' | 'ammonia' | 'nitrite' | 'nitrate' | 'hardness' | 'oxygen' | 'salt' | 'chlorine' | 'phosphate' | 'level'

export interface ParameterInfo {
  key: ReadingKey
  /** As forms and tables label it, e.g. "Total ammonia". */
  label: string
  /** Words for a customer, e.g. "Ammonia". */
  plain: string
  /** What the number is measured as, e.g. "as N", "as CaCO3" (shown after the unit in forms). */
  basis: string
  /** The SI (or lab) unit the value is stored in. */
  siUnit: string
  kind: QuantityKind
  /** Digits shown in both systems, when the kind's default is not right (set only for kinds shown in the same unit in both). */
  digits?: number
  group: ChartGroup
  /** Measured by a kit and typed into a form (false: computed by the engine). */
  measured: boolean
  /** Name of the column in readings CSV exports (snake case, SI unit). */
  column: string
}

const P = (info: ParameterInfo): ParameterInfo => info

export const PARAMETER_CATALOGUE: Record<ReadingKey, ParameterInfo> = {
  temperatureC: P({ key: 'temperatureC', label: 'Water temperature', plain: 'Water temperature', basis: '', siUnit: '°C', kind: 'temperature', group: 'temperature', measured: true, column: 'temperature_c' }),
  pH: P({ key: 'pH', label: 'pH', plain: 'pH', basis: '', siUnit: '', kind: 'pH', group: 'ph', measured: true, column: 'ph' }),
  totalAmmoniaMgL: P({ key: 'totalAmmoniaMgL', label: 'Total ammonia (TAN)', plain: 'Ammonia', basis: 'as N', siUnit: 'mg/L', kind: 'concentration', digits: 2, group: 'ammonia', measured: true, column: 'total_ammonia_mg_l_as_n' }),
  nh3MgL: P({ key: 'nh3MgL', label: 'Un-ionized ammonia', plain: 'Free ammonia', basis: 'as NH3', siUnit: 'mg/L', kind: 'concentration', digits: 3, group: 'ammonia', measured: false, column: 'nh3_mg_l' }),
  nitriteMgL: P({ key: 'nitriteMgL', label: 'Nitrite', plain: 'Nitrite', basis: 'as NO2', siUnit: 'mg/L', kind: 'concentration', digits: 2, group: 'nitrite', measured: true, column: 'nitrite_mg_l' }),
  nitrateMgL: P({ key: 'nitrateMgL', label: 'Nitrate', plain: 'Nitrate', basis: 'as NO3', siUnit: 'mg/L', kind: 'concentration', digits: 0, group: 'nitrate', measured: true, column: 'nitrate_mg_l' }),
  khMgL: P({ key: 'khMgL', label: 'KH', plain: 'KH (buffering)', basis: 'as CaCO3', siUnit: 'mg/L', kind: 'concentration', digits: 0, group: 'hardness', measured: true, column: 'kh_mg_l' }),
  ghMgL: P({ key: 'ghMgL', label: 'GH', plain: 'Hardness (GH)', basis: 'as CaCO3', siUnit: 'mg/L', kind: 'concentration', digits: 0, group: 'hardness', measured: true, column: 'gh_mg_l' }),
  dissolvedOxygenMgL: P({ key: 'dissolvedOxygenMgL', label: 'Dissolved oxygen', plain: 'Oxygen', basis: '', siUnit: 'mg/L', kind: 'concentration', digits: 1, group: 'oxygen', measured: true, column: 'dissolved_oxygen_mg_l' }),
  doSaturationPct: P({ key: 'doSaturationPct', label: 'Oxygen saturation', plain: 'Oxygen', basis: '', siUnit: '%', kind: 'percent', digits: 0, group: 'oxygen', measured: false, column: 'do_saturation_pct' }),
  saltGL: P({ key: 'saltGL', label: 'Salt', plain: 'Salt', basis: '', siUnit: 'g/L', kind: 'salt', group: 'salt', measured: true, column: 'salt_g_l' }),
  chlorineMgL: P({ key: 'chlorineMgL', label: 'Chlorine', plain: 'Chlorine', basis: 'as Cl2', siUnit: 'mg/L', kind: 'concentration', digits: 2, group: 'chlorine', measured: true, column: 'chlorine_mg_l' }),
  phosphateMgL: P({ key: 'phosphateMgL', label: 'Phosphate', plain: 'Phosphate', basis: 'as PO4', siUnit: 'mg/L', kind: 'concentration', digits: 2, group: 'phosphate', measured: true, column: 'phosphate_mg_l' }),
  waterLevelMm: P({ key: 'waterLevelMm', label: 'Water level', plain: 'Water level', basis: 'against the mark', siUnit: 'mm', kind: 'level', group: 'level', measured: true, column: 'water_level_mm' }),
}

/** The catalogue in reading order. */
export const PARAMETER_LIST: readonly ParameterInfo[] = READING_KEYS.map(k => PARAMETER_CATALOGUE[k])

/** Parameters a technician or customer types in (computed ones left out). */
export const MEASURED_PARAMETERS: readonly ParameterInfo[] = PARAMETER_LIST.filter(p => p.measured)

export const parameterInfo = (key: ReadingKey | Parameter): ParameterInfo => PARAMETER_CATALOGUE[key]

/** The unit a parameter is shown and typed in, e.g. '°F' or 'mg/L'. */
export function parameterUnit(key: ReadingKey, system: UnitSystem): string {
  return unitFor(PARAMETER_CATALOGUE[key].kind, system)
}

/** Digits shown for a parameter in a system. */
export function parameterDigits(key: ReadingKey, system: UnitSystem): number {
  const p = PARAMETER_CATALOGUE[key]
  return p.digits ?? digitsFor(p.kind, system)
}

/** Label with the unit (and basis) as a form or a table header shows it: "Water temperature (°F)", "KH (mg/L as CaCO3)". */
export function parameterHeading(key: ReadingKey, system: UnitSystem): string {
  const p = PARAMETER_CATALOGUE[key]
  const unit = [parameterUnit(key, system), p.kind === 'level' ? '' : p.basis].filter(Boolean).join(' ')
  return unit ? `${p.label} (${unit})` : p.label
}

/** A stored value as the number shown (unrounded). */
export const parameterToDisplay = (key: ReadingKey, si: number, system: UnitSystem): number => toDisplay(PARAMETER_CATALOGUE[key].kind, si, system)
/** A typed number → the stored value. */
export const parameterFromDisplay = (key: ReadingKey, shown: number, system: UnitSystem): number => fromDisplay(PARAMETER_CATALOGUE[key].kind, shown, system)

/** "78.8 °F", "0.25 mg/L", "7.0": a stored value in the system's units, rounded for reading. */
export function formatParameter(key: ReadingKey, si: number, system: UnitSystem, opts: { bare?: boolean, digits?: number } = {}): string {
  const p = PARAMETER_CATALOGUE[key]
  return formatQuantity(p.kind, si, system, { digits: opts.digits ?? parameterDigits(key, system), bare: opts.bare })
}
