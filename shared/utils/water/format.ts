// The one unit formatter: every number a person reads goes through here, in the company's unit
// system. Values arrive in the SI (or SI-derived lab) units they are stored in; conversions are
// the exact definitions of ./units (NIST Handbook 44, Appendix C).
import {
  CUBIC_FOOT_L, FOOT_M, INCH_M, POUND_G, SQUARE_FOOT_M2, US_GALLON_L,
  celsiusToFahrenheit, fahrenheitToCelsius,
} from './units'

export const UNIT_SYSTEMS = ['us', 'metric'] as const
export type UnitSystem = (typeof UNIT_SYSTEMS)[number]

/** 1 US fluid ounce = 1/128 US gallon = 29.5735295625 mL exactly. */
export const US_FL_OZ_ML = (US_GALLON_L * 1000) / 128
/** 1 avoirdupois ounce = 1/16 lb = 28.349523125 g exactly. */
export const OUNCE_G = POUND_G / 16

/**
 * What a stored number measures, and the SI unit it is stored in:
 * temperature °C · volume L (of water in a feature) · liquid mL (a dose to measure out) ·
 * mass g · length m · depth m (shown in inches or centimetres) · level mm (water level against a mark) ·
 * altitude m · area m² · flow L/h · concentration mg/L · salt g/L · percent · pH · count.
 */
export type QuantityKind =
  | 'temperature' | 'volume' | 'liquid' | 'mass' | 'length' | 'depth' | 'level' | 'altitude' | 'area' | 'flow'
  | 'concentration' | 'salt' | 'percent' | 'pH' | 'plain'

interface KindUnits {
  /** Unit shown and typed in each system. */
  unit: Record<UnitSystem, string>
  /** SI value → the number in the system's unit. */
  out: Record<UnitSystem, (si: number) => number>
  /** The number in the system's unit → SI. */
  in: Record<UnitSystem, (v: number) => number>
  /** Digits after the point shown by default. */
  digits: Record<UnitSystem, number>
}

const same = (v: number) => v
const both = <T>(v: T): Record<UnitSystem, T> => ({ us: v, metric: v })

const KINDS: Record<QuantityKind, KindUnits> = {
  temperature: {
    unit: { us: '°F', metric: '°C' },
    out: { us: celsiusToFahrenheit, metric: same },
    in: { us: fahrenheitToCelsius, metric: same },
    digits: both(1),
  },
  volume: {
    unit: { us: 'US gal', metric: 'L' },
    out: { us: l => l / US_GALLON_L, metric: same },
    in: { us: g => g * US_GALLON_L, metric: same },
    digits: both(0),
  },
  liquid: {
    unit: { us: 'fl oz', metric: 'mL' },
    out: { us: ml => ml / US_FL_OZ_ML, metric: same },
    in: { us: oz => oz * US_FL_OZ_ML, metric: same },
    digits: { us: 1, metric: 0 },
  },
  mass: {
    unit: { us: 'oz', metric: 'g' },
    out: { us: g => g / OUNCE_G, metric: same },
    in: { us: oz => oz * OUNCE_G, metric: same },
    digits: { us: 1, metric: 0 },
  },
  length: {
    unit: { us: 'ft', metric: 'm' },
    out: { us: m => m / FOOT_M, metric: same },
    in: { us: ft => ft * FOOT_M, metric: same },
    digits: { us: 1, metric: 2 },
  },
  depth: {
    unit: { us: 'in', metric: 'cm' },
    out: { us: m => m / INCH_M, metric: m => m * 100 },
    in: { us: i => i * INCH_M, metric: cm => cm / 100 },
    digits: both(1),
  },
  level: {
    unit: { us: 'in', metric: 'cm' },
    out: { us: mm => mm / (INCH_M * 1000), metric: mm => mm / 10 },
    in: { us: i => i * INCH_M * 1000, metric: cm => cm * 10 },
    digits: { us: 2, metric: 1 },
  },
  altitude: {
    unit: { us: 'ft', metric: 'm' },
    out: { us: m => m / FOOT_M, metric: same },
    in: { us: ft => ft * FOOT_M, metric: same },
    digits: both(0),
  },
  area: {
    unit: { us: 'ft²', metric: 'm²' },
    out: { us: m2 => m2 / SQUARE_FOOT_M2, metric: same },
    in: { us: f => f * SQUARE_FOOT_M2, metric: same },
    digits: { us: 0, metric: 1 },
  },
  flow: {
    unit: { us: 'US gal/h', metric: 'L/h' },
    out: { us: l => l / US_GALLON_L, metric: same },
    in: { us: g => g * US_GALLON_L, metric: same },
    digits: both(0),
  },
  concentration: { unit: both('mg/L'), out: both(same), in: both(same), digits: both(2) },
  // Salt: US keepers speak in percent (1 g/L = 0.1 %), metric in grams per litre.
  salt: {
    unit: { us: '%', metric: 'g/L' },
    out: { us: gl => gl / 10, metric: same },
    in: { us: pct => pct * 10, metric: same },
    digits: { us: 2, metric: 1 },
  },
  percent: { unit: both('%'), out: both(same), in: both(same), digits: both(0) },
  pH: { unit: both(''), out: both(same), in: both(same), digits: both(1) },
  plain: { unit: both(''), out: both(same), in: both(same), digits: both(2) },
}

/** The unit a kind is shown and typed in, e.g. '°F'. */
export function unitFor(kind: QuantityKind, system: UnitSystem): string {
  return KINDS[kind].unit[system]
}

/** An SI value as the number shown in the system's unit (unrounded). */
export function toDisplay(kind: QuantityKind, si: number, system: UnitSystem): number {
  return KINDS[kind].out[system](si)
}

/** A number typed in the system's unit → SI. */
export function fromDisplay(kind: QuantityKind, shown: number, system: UnitSystem): number {
  return KINDS[kind].in[system](shown)
}

/** Default digits after the point for a kind. */
export function digitsFor(kind: QuantityKind, system: UnitSystem): number {
  return KINDS[kind].digits[system]
}

/** A plain number with thousands separators and at most `digits` decimals (no trailing zeros). */
export function formatNumber(v: number, digits = 2, minDigits = 0): string {
  const d = Math.max(0, Math.min(20, digits))
  const min = Math.min(minDigits, d)
  // Making an Intl.NumberFormat costs far more than using one: one per digits pair, kept.
  const key = d * 32 + min
  let f = numberFormats.get(key)
  if (!f) numberFormats.set(key, (f = new Intl.NumberFormat('en-US', { maximumFractionDigits: d, minimumFractionDigits: min })))
  return f.format(v === 0 ? 0 : v)
}
const numberFormats = new Map<number, Intl.NumberFormat>()

const withUnit = (n: string, unit: string) => (!unit ? n : unit === '%' ? `${n} %` : `${n} ${unit}`)

export interface FormatOptions {
  /** Digits after the point (default: the kind's). */
  digits?: number
  /** Leave the unit off. */
  bare?: boolean
}

/** "78.8 °F", "5,678 L", "1.2 in": an SI value in the system's unit. */
export function formatQuantity(kind: QuantityKind, si: number, system: UnitSystem, opts: FormatOptions = {}): string {
  const digits = opts.digits ?? digitsFor(kind, system)
  const minDigits = kind === 'pH' ? 1 : 0
  const n = formatNumber(toDisplay(kind, si, system), digits, minDigits)
  return opts.bare ? n : withUnit(n, unitFor(kind, system))
}

/** Rounds to `step` (e.g. 0.5 oz) without binary noise. */
function toStep(v: number, step: number): number {
  return Number((Math.round(v / step) * step).toFixed(6))
}

/** Smallest amount worth writing down: under it a dose shows as "a pinch" of its unit, rounded up. */
function measured(v: number, step: number): number {
  return v > 0 && v < step ? step : toStep(v, step)
}

/**
 * A dose to measure out, rounded to what a person can weigh or pour: grams (≥ 1 kg in kg with
 * one decimal) or ounces (≥ 1 lb in pounds with one decimal) for `mass`; millilitres (≥ 1 L in
 * litres) or fluid ounces (≥ 1 gal in gallons) for `liquid`; and a feature's water in whole
 * litres or gallons (tens above 1,000) for `volume`. Input in g, mL or L.
 */
export function formatAmount(kind: 'mass' | 'liquid' | 'volume', si: number, system: UnitSystem): string {
  const v = Math.max(0, si)
  if (kind === 'mass') {
    if (system === 'metric') {
      if (v >= 1000) return `${formatNumber(measured(v / 1000, 0.1), 1)} kg`
      return `${formatNumber(measured(v, v < 10 ? 0.5 : v < 100 ? 1 : 5), 1)} g`
    }
    const oz = v / OUNCE_G
    if (oz >= 16) return `${formatNumber(measured(oz / 16, 0.1), 1)} lb`
    return `${formatNumber(measured(oz, oz < 2 ? 0.1 : 0.5), 1)} oz`
  }
  if (kind === 'liquid') {
    if (system === 'metric') {
      if (v >= 1000) return `${formatNumber(measured(v / 1000, 0.1), 1)} L`
      return `${formatNumber(measured(v, v < 10 ? 0.5 : v < 100 ? 1 : 5), 1)} mL`
    }
    const oz = v / US_FL_OZ_ML
    if (oz >= 128) return `${formatNumber(measured(oz / 128, 0.1), 1)} US gal`
    return `${formatNumber(measured(oz, oz < 2 ? 0.1 : 0.5), 1)} fl oz`
  }
  const shown = toDisplay('volume', v, system)
  const step = shown >= 1000 ? 10 : 1
  return `${formatNumber(measured(shown, step), 0)} ${unitFor('volume', system)}`
}

/** Units a product's label or a dose can be given in, by what they measure (SI first). */
const AMOUNT_UNITS: Record<string, { kind: 'mass' | 'liquid' | 'volume', toSi: number }> = {
  'g': { kind: 'mass', toSi: 1 },
  'kg': { kind: 'mass', toSi: 1000 },
  'oz': { kind: 'mass', toSi: OUNCE_G },
  'lb': { kind: 'mass', toSi: POUND_G },
  'mL': { kind: 'liquid', toSi: 1 },
  'ml': { kind: 'liquid', toSi: 1 },
  'L': { kind: 'liquid', toSi: 1000 },
  'l': { kind: 'liquid', toSi: 1000 },
  'fl oz': { kind: 'liquid', toSi: US_FL_OZ_ML },
  'US gal': { kind: 'liquid', toSi: US_GALLON_L * 1000 },
  'gal': { kind: 'liquid', toSi: US_GALLON_L * 1000 },
  'ft³': { kind: 'liquid', toSi: CUBIC_FOOT_L * 1000 },
}

/**
 * A dose given in a label's unit (g, kg, mL, L, oz, lb, fl oz, gal) in the system's units,
 * rounded to what can be measured out. Units that are not a mass or a liquid volume (tablets,
 * scoops) are shown as they are.
 */
export function formatDose(amount: number, unit: string, system: UnitSystem): string {
  const u = AMOUNT_UNITS[unit.trim()]
  if (!u) return `${formatNumber(amount, amount < 10 ? 1 : 0)} ${unit}`.trim()
  return formatAmount(u.kind, amount * u.toSi, system)
}
