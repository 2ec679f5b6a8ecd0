// Finds unit words of the other unit system in text a person reads: a US company's sentences
// must not say °C, L, mL, g, kg, m, cm or mm; a metric company's must not say °F, gal, fl oz,
// oz, lb, ft or in. Concentrations (mg/L, g/L), percent and pH belong to both and are not flagged.
import type { UnitSystem } from '../../shared/utils/water/format'

/** A number, then the unit: "5,678 L", "1.2kg", "3 ft". */
const NUM = String.raw`\d(?:[\d,]*\d)?(?:\.\d+)?\s?`
/** Not part of a concentration or a rate ("mg/L", "g/L", "L/h" is checked on its own). */
const NOT_PER = String.raw`(?![\/\w²³])`

const TOKENS: Record<UnitSystem, Array<[name: string, re: RegExp]>> = {
  // Units that give a metric text away: a US text must have none.
  metric: [
    ['°C', /°\s?C\b/],
    ['Celsius', /\bcelsius\b/i],
    ['litres', /\b(?:litres?|liters?|millilit(?:re|er)s?)\b/i],
    ['L', new RegExp(String.raw`${NUM}(?:L|l|mL|ml)${NOT_PER}`)],
    ['L/h', new RegExp(String.raw`${NUM}L\/h\b`)],
    ['g, kg', new RegExp(String.raw`${NUM}(?:g|kg)${NOT_PER}`)],
    ['grams', /\b(?:kilo)?grams?\b/i],
    ['m, cm, mm', new RegExp(String.raw`${NUM}(?:m|cm|mm)(?:²|³)?(?![\/\w])`)],
    ['metres', /\b(?:centi|milli)?(?:metres?|meters?)\b/i],
  ],
  // Units that give a US text away: a metric text must have none.
  us: [
    ['°F', /°\s?F\b/],
    ['Fahrenheit', /\bfahrenheit\b/i],
    ['gal', /\b(?:US\s)?gal(?:lons?)?\b/i],
    ['fl oz', /\bfl\.?\s?oz\b/i],
    ['oz', new RegExp(String.raw`${NUM}oz\b`)],
    ['ounces', /\bounces?\b/i],
    ['lb', new RegExp(String.raw`${NUM}lbs?\b`)],
    ['pounds', /\bpounds?\b/i],
    ['ft', new RegExp(String.raw`${NUM}(?:ft|feet|foot)(?:²|³)?(?![\w])`)],
    ['in', new RegExp(String.raw`${NUM}(?:in|inch|inches)\b(?!\s(?:a|an|the|range|all|total|one|each|every|\d))`)],
  ],
}

export interface UnitFinding { sentence: string, token: string, match: string }

/** Splits text into sentences and lines (numbers like "7.5" keep their point). */
export function sentencesOf(text: string): string[] {
  return text.split(/\r?\n|(?<=[.!?])\s+(?=[A-Z(])/).map(s => s.trim()).filter(Boolean)
}

/** Every place in `texts` where a unit of the system other than `system` is written. */
export function foreignUnits(texts: string | readonly string[], system: UnitSystem): UnitFinding[] {
  const other: UnitSystem = system === 'us' ? 'metric' : 'us'
  const out: UnitFinding[] = []
  for (const sentence of (typeof texts === 'string' ? [texts] : texts).flatMap(sentencesOf)) {
    for (const [token, re] of TOKENS[other]) {
      const m = re.exec(sentence)
      if (m) out.push({ sentence, token, match: m[0] })
    }
  }
  return out
}

/** Every string inside a JSON value (the sentences of an API response), keys left out. */
export function stringsOf(value: unknown, skipKeys: ReadonlySet<string> = new Set()): string[] {
  if (typeof value === 'string') return [value]
  if (Array.isArray(value)) return value.flatMap(v => stringsOf(v, skipKeys))
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => (skipKeys.has(k) ? [] : stringsOf(v, skipKeys)))
  return []
}
