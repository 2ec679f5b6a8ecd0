// Finds unit tokens of the other unit system in a text a person reads: a US company's sentence must
// hold no °C, L, mL, g, kg, m, cm, mm or m²; a metric one no °F, gal, fl oz, oz, lb, ft, in or ft².
// Neutral: concentrations in mg/L (a lab unit in both systems), %, ppt, dKH, pH, kPa. Salt in g/L is
// the metric way of saying it (US says %), so "g/L" counts as metric. Letters that are also words
// ("in", "m", "L", "g") count only right after a number ("12 in", "5 L"), so "in the pond" is fine.
import type { UnitSystem } from '../../shared/utils/water/format'

interface Pattern { re: RegExp, system: UnitSystem }

const NUM = String.raw`\d(?:[\d,]*\d)?(?:\.\d+)?`
/** A unit right after a number (a space between or not), not followed by more of a word or a "/". */
const afterNumber = (unit: string, system: UnitSystem): Pattern => ({ re: new RegExp(String.raw`${NUM}\s?(${unit})(?![\p{L}\d/²³])`, 'gu'), system })
/** A unit anywhere as a whole word. */
const word = (unit: string, system: UnitSystem, flags = 'giu'): Pattern => ({ re: new RegExp(String.raw`(?<![\p{L}/])(${unit})(?![\p{L}])`, flags), system })

const PATTERNS: Pattern[] = [
  // temperature
  { re: /(°\s?C)(?![a-z])/gu, system: 'metric' },
  { re: /(°\s?F)(?![a-z])/gu, system: 'us' },
  word('degrees? (?:Celsius|centigrade)|Celsius', 'metric'),
  word('degrees? Fahrenheit|Fahrenheit', 'us'),
  // volume and liquid
  word('litres?|liters?|millilitres?|milliliters?', 'metric'),
  afterNumber('L|l|mL|ml|L/h|m³', 'metric'),
  word('m³|L/h', 'metric', 'gu'),
  word('(?:US )?gal(?:lons?)?(?:/h)?|fl\\.? ?oz|fluid ounces?|ft³|cu\\.? ?ft|cubic f(?:ee|oo)t', 'us'),
  // mass
  word('grams?|kilograms?|kilos?', 'metric'),
  afterNumber('g|kg', 'metric'),
  { re: /(?<![\p{L}])(g\/L)(?![\p{L}])/gu, system: 'metric' },
  word('lbs?|pounds?|ounces?', 'us'),
  afterNumber('oz', 'us'),
  // length and area
  word('centimet(?:re|er)s?|millimet(?:re|er)s?|m²|sq\\.? ?m|square met(?:re|er)s?', 'metric'),
  // "metre" only after a number: a top-up meter is a thing, not a length
  afterNumber('m|cm|mm|metres?|meters?', 'metric'),
  word('ft²|sq\\.? ?ft|square f(?:ee|oo)t|feet|foot|ft|inch(?:es)?', 'us'),
  { re: new RegExp(String.raw`${NUM}\s?(in|″)(?![\p{L}\d])(?!\s*\d)`, 'gu'), system: 'us' },
]

const other = (s: UnitSystem): UnitSystem => (s === 'us' ? 'metric' : 'us')

/** Unit tokens in `text` that belong to the other system than `system`, in the order found. */
export function foreignUnits(text: string, system: UnitSystem): string[] {
  const found: Array<{ at: number, token: string }> = []
  for (const p of PATTERNS) {
    if (p.system !== other(system)) continue
    for (const m of text.matchAll(p.re)) {
      const token = m[1]!
      found.push({ at: (m.index ?? 0) + m[0].length - token.length, token })
    }
  }
  // Two patterns can find the same token ("4,000 L/h"): keep one per position.
  const byPosition = new Map(found.map(f => [f.at, f.token]))
  return [...byPosition.entries()].sort((a, b) => a[0] - b[0]).map(([, token]) => token)
}

/** Every string in a nested value (objects, arrays), e.g. all the sentences of a suggestion list. */
export function stringsIn(value: unknown, skipKeys: ReadonlySet<string> = new Set()): string[] {
  if (typeof value === 'string') return [value]
  if (Array.isArray(value)) return value.flatMap(v => stringsIn(v, skipKeys))
  if (value && typeof value === 'object') {
    return Object.entries(value).flatMap(([k, v]) => (skipKeys.has(k) ? [] : stringsIn(v, skipKeys)))
  }
  return []
}

/** Each string with its foreign units, for a readable failure; empty when all is in `system`. */
export function foreignUnitsIn(texts: readonly string[], system: UnitSystem): Array<{ text: string, units: string[] }> {
  return texts.map(text => ({ text, units: foreignUnits(text, system) })).filter(x => x.units.length > 0)
}
