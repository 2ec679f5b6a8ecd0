import {
  digitsFor, formatAmount, formatDose, formatParameter, formatQuantity, fromDisplay, parameterHeading, parameterUnit, toDisplay, unitFor,
  type QuantityKind, type ReadingKey, type UnitSystem,
} from '#shared/utils/water-chemistry'
import { readNumber, type NumberRule, type ReadNumber } from '~/utils/numbers'

export type { QuantityKind } from '#shared/utils/water-chemistry'

/**
 * The company's unit system (or the signed-in person's own choice) for display and input: a thin
 * wrapper over the one unit formatter (`shared/utils/water/format.ts`), with no arithmetic of its
 * own. Values are stored in SI; forms read what people type with `read(text, kind, rule)` (the
 * number in SI, or the error to show in place) before validating. Rules are in the unit typed.
 */
export function useUnits() {
  const { data: company } = useFetch('/api/company', { key: 'company' })
  const system = computed<UnitSystem>(() => company.value?.unitSystem ?? 'us')
  /** An SI value as the number put in a form field (rounded to the kind's digits, one more for small units). */
  const out = (kind: QuantityKind, si: number | null | undefined, digits = digitsFor(kind, system.value) + 1) =>
    (si == null ? null : Number(toDisplay(kind, si, system.value).toFixed(digits)))
  const inSi = (kind: QuantityKind, v: number) => fromDisplay(kind, v, system.value)
  const show = (kind: QuantityKind) => (si: number | null | undefined) => (si == null ? '—' : formatQuantity(kind, si, system.value))
  return {
    system,
    /** The text of a number field in the company's unit → `{ value }` in SI (null when empty) or `{ error }` to show by the field. */
    read: (text: string | number | null | undefined, kind: QuantityKind = 'plain', rule: NumberRule = {}): ReadNumber => {
      const r = readNumber(text, rule)
      return r.value == null ? r : { value: inSi(kind, r.value), error: '' }
    },
    /** The unit a kind is shown and typed in, e.g. '°F'. */
    unit: (kind: QuantityKind) => unitFor(kind, system.value),
    /** An SI value as the number shown in a form field. */
    out,
    /** A number typed in the company's unit → SI. */
    in: inSi,
    /** "78.8 °F", "1,500 US gal": any stored quantity in the company's units. */
    format: (kind: QuantityKind, si: number | null | undefined) => show(kind)(si),
    /** A water parameter's stored value with its unit, e.g. "0.25 mg/L". */
    parameter: (key: ReadingKey, si: number | null | undefined, bare = false) => (si == null ? '—' : formatParameter(key, si, system.value, { bare })),
    /** "Water temperature (°F)". */
    heading: (key: ReadingKey) => parameterHeading(key, system.value),
    parameterUnit: (key: ReadingKey) => parameterUnit(key, system.value),
    /** A dose in a label's unit (g, mL, kg…) in the company's units, rounded to what can be measured out. */
    dose: (amount: number, unit: string) => formatDose(amount, unit, system.value),
    /** A mass (g), liquid (mL) or water volume (L) to measure out. */
    amount: (kind: 'mass' | 'liquid' | 'volume', si: number) => formatAmount(kind, si, system.value),
    temperatureUnit: computed(() => unitFor('temperature', system.value)),
    temperatureOut: (c: number | null | undefined) => out('temperature', c, 1),
    lengthUnit: computed(() => unitFor('length', system.value)),
    flowUnit: computed(() => unitFor('flow', system.value)),
    volumeUnit: computed(() => unitFor('volume', system.value)),
    /** metres → the number shown in a form */
    lengthOut: (m: number | null | undefined) => out('length', m, 2),
    /** the number typed in a form → metres */
    lengthIn: (v: number) => inSi('length', v),
    flowOut: (lph: number | null | undefined) => out('flow', lph, 0),
    flowIn: (v: number) => inSi('flow', v),
    volumeOut: (l: number | null | undefined) => out('volume', l, 0),
    volumeIn: (v: number) => inSi('volume', v),
    /** "1,185 US gal" or "4,486 L". */
    volume: show('volume'),
    area: show('area'),
    length: show('length'),
    flow: show('flow'),
  }
}
