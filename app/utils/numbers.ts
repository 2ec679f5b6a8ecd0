/** What a number field accepts, in the unit the person types in. */
export interface NumberRule {
  /** at least this */
  min?: number
  /** more than this (e.g. 0 for an amount) */
  above?: number
  /** at most this */
  max?: number
  /** whole numbers only (fish, watts, minutes) */
  whole?: boolean
}

/** A number field's text read: `value` is null when the field is empty or cannot be used; `error` says why, in words. */
export interface ReadNumber {
  value: number | null
  error: string
}

const PLAIN = /^[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:e[-+]?\d+)?$/i
const THOUSANDS = /^[-+]?\d{1,3}(?:,\d{3})+(?:\.\d+)?$/

const show = (n: number) => new Intl.NumberFormat('en-US', { maximumFractionDigits: 4 }).format(n)

/**
 * The one way a form reads what was typed in a number field. Accepts "7.4", "7,4" and
 * "1,200"; anything else ("abc", "7.4.1") is an error to show in place, never a silent blank.
 */
export function readNumber(text: string | number | null | undefined, rule: NumberRule = {}): ReadNumber {
  const typed = String(text ?? '').trim()
  if (typed === '') return { value: null, error: '' }
  const compact = typed.replace(/\s+/g, '')
  const normal = THOUSANDS.test(compact) ? compact.replace(/,/g, '') : compact.replace(/^([^,]*),([^,]*)$/, '$1.$2')
  const v = Number(normal)
  if (!PLAIN.test(normal) || !Number.isFinite(v)) return { value: null, error: `“${typed}” is not a number` }
  if (rule.whole && !Number.isInteger(v)) return { value: null, error: 'Enter a whole number' }
  if (rule.above !== undefined && !(v > rule.above)) return { value: null, error: `Must be more than ${show(rule.above)}` }
  if (rule.min !== undefined && v < rule.min) return { value: null, error: `Must be at least ${show(rule.min)}` }
  if (rule.max !== undefined && v > rule.max) return { value: null, error: `Must be at most ${show(rule.max)}` }
  return { value: v, error: '' }
}
