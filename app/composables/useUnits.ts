import {
  celsiusToFahrenheit, fahrenheitToCelsius, feetToMetres, litresPerHourToUsGph, litresToUsGallons, metresToFeet, squareMetresToSquareFeet, usGphToLitresPerHour,
} from '#shared/utils/water-chemistry'
import { readNumber, type NumberRule, type ReadNumber } from '~/utils/numbers'

const nf = (digits: number) => new Intl.NumberFormat('en-US', { maximumFractionDigits: digits })

/** What a number field holds, for converting from the company's units to SI. */
export type QuantityKind = 'length' | 'flow' | 'volume' | 'temperature' | 'plain'

/**
 * The company's unit system for display and input. Values are stored in SI; forms read what
 * people type with `read(text, kind, rule)` (the number in SI, or the error to show in place)
 * before validating.
 */
export function useUnits() {
  const { data: company } = useFetch('/api/company', { key: 'company' })
  const system = computed(() => company.value?.unitSystem ?? 'us')
  const us = computed(() => system.value === 'us')
  const toSi: Record<QuantityKind, (v: number) => number> = {
    length: v => (us.value ? feetToMetres(v) : v),
    flow: v => (us.value ? usGphToLitresPerHour(v) : v),
    volume: v => (us.value ? v * 3.785411784 : v),
    temperature: v => (us.value ? fahrenheitToCelsius(v) : v),
    plain: v => v,
  }
  return {
    system,
    /** The text of a number field in the company's unit → `{ value }` in SI (null when empty) or `{ error }` to show by the field. */
    read: (text: string | number | null | undefined, kind: QuantityKind = 'plain', rule: NumberRule = {}): ReadNumber => {
      const r = readNumber(text, rule)
      return r.value == null ? r : { value: toSi[kind](r.value), error: '' }
    },
    temperatureUnit: computed(() => (us.value ? '°F' : '°C')),
    temperatureOut: (c: number | null | undefined) => (c == null ? null : Number((us.value ? celsiusToFahrenheit(c) : c).toFixed(1))),
    lengthUnit: computed(() => (us.value ? 'ft' : 'm')),
    flowUnit: computed(() => (us.value ? 'US gal/h' : 'L/h')),
    volumeUnit: computed(() => (us.value ? 'US gal' : 'L')),
    /** metres → the number shown in a form */
    lengthOut: (m: number | null | undefined) => (m == null ? null : Number((us.value ? metresToFeet(m) : m).toFixed(2))),
    /** the number typed in a form → metres */
    lengthIn: (v: number) => (us.value ? feetToMetres(v) : v),
    flowOut: (lph: number | null | undefined) => (lph == null ? null : Math.round(us.value ? litresPerHourToUsGph(lph) : lph)),
    flowIn: (v: number) => (us.value ? usGphToLitresPerHour(v) : v),
    volumeOut: (l: number | null | undefined) => (l == null ? null : Math.round(us.value ? litresToUsGallons(l) : l)),
    volumeIn: (v: number) => (us.value ? v * 3.785411784 : v),
    /** "1,185 US gal (4,486 L)" — the company's unit first, the other in brackets. */
    volume: (l: number | null | undefined) => {
      if (l == null) return '—'
      const gal = `${nf(0).format(litresToUsGallons(l))} US gal`
      const lit = `${nf(0).format(l)} L`
      return us.value ? `${gal} (${lit})` : `${lit} (${gal})`
    },
    area: (m2: number | null | undefined) => (m2 == null ? '—' : us.value ? `${nf(0).format(squareMetresToSquareFeet(m2))} ft²` : `${nf(1).format(m2)} m²`),
    length: (m: number | null | undefined) => (m == null ? '—' : us.value ? `${nf(1).format(metresToFeet(m))} ft` : `${nf(2).format(m)} m`),
    flow: (lph: number | null | undefined) => (lph == null ? '—' : us.value ? `${nf(0).format(litresPerHourToUsGph(lph))} US gal/h` : `${nf(0).format(lph)} L/h`),
  }
}
