// Reading a water parameter typed in the company's units: the number in SI, or an error quoting
// the limit in the unit typed and naming the field as the form labels it. The limits are the
// shared reading schema's (in SI), so the form and the API refuse the same values.
import { z } from 'zod'
import { waterReadingSchema } from '#shared/schemas/water'
import { formatParameter, PARAMETER_CATALOGUE, parameterDigits, parameterFromDisplay, parameterToDisplay, type ReadingKey, type UnitSystem } from '#shared/utils/water-chemistry'
import { readNumber, type ReadNumber } from '~/utils/numbers'

/** The SI limits the shared schema puts on a parameter (undefined where it sets none). */
export function readingLimits(key: ReadingKey): { min?: number, max?: number } {
  let s: unknown = (waterReadingSchema.shape as Record<string, unknown>)[key]
  while (s instanceof z.ZodOptional || s instanceof z.ZodNullable) s = s.unwrap()
  if (!(s instanceof z.ZodNumber)) return {}
  return { min: s.minValue ?? undefined, max: s.maxValue ?? undefined }
}

/** Room for rounding when a limit is compared in the unit typed (113 °F is 45 °C). */
const EPS = 1e-9

/**
 * The text of a parameter's field → `{ value }` in SI (null when empty) or `{ error }` in words,
 * e.g. "Water temperature above 113 °F is not plausible".
 */
export function readParameter(key: ReadingKey, text: string | number | null | undefined, system: UnitSystem, label = PARAMETER_CATALOGUE[key].label): ReadNumber {
  const r = readNumber(text)
  if (r.value == null) return r
  const { min, max } = readingLimits(key)
  const shown = r.value
  if (min !== undefined && shown < parameterToDisplay(key, min, system) - EPS) {
    const error = min === 0 && PARAMETER_CATALOGUE[key].kind !== 'temperature'
      ? `${label} cannot be negative`
      : `${label} below ${formatParameter(key, min, system)} is not plausible`
    return { value: null, error }
  }
  if (max !== undefined && shown > parameterToDisplay(key, max, system) + EPS) {
    return { value: null, error: `${label} above ${formatParameter(key, max, system)} is not plausible` }
  }
  return { value: parameterFromDisplay(key, shown, system), error: '' }
}

/** A stored value as the text of its field (rounded one digit finer than it is shown). */
export function parameterFieldText(key: ReadingKey, si: number | null | undefined, system: UnitSystem): string {
  if (si == null) return ''
  return String(Number(parameterToDisplay(key, si, system).toFixed(Math.min(parameterDigits(key, system) + 1, 4))))
}
