// The figures a dosing line was computed from, as labelled figures in the company's units
// ("Volume 1,500 US gal, Total ammonia (TAN) now 2 mg/L"), never as the engine's raw keys.
import {
  formatAmount, formatDose, formatParameter, formatQuantity, PARAMETER_CATALOGUE, READING_KEYS,
  type QuantityKind, type ReadingKey, type UnitSystem,
} from '#shared/utils/water-chemistry'

/** Inputs that are not a water parameter: their label and what they measure. */
const OTHER: Record<string, { label: string, kind: QuantityKind, scale?: number, digits?: number }> = {
  volumeL: { label: 'Volume', kind: 'volume' },
  topUpLitres: { label: 'Top-up', kind: 'volume' },
  fraction: { label: 'Share of the water', kind: 'percent', scale: 100 },
  days: { label: 'Days', kind: 'plain', digits: 0 },
  chlorideMgL: { label: 'Chloride', kind: 'concentration', digits: 0 },
}
/** Stems the engine spells its own way, by the catalogue key they measure. */
const ALIAS: Record<string, ReadingKey> = { tanmglasn: 'totalAmmoniaMgL' }
/** Shown elsewhere (KH in dKH repeats KH in mg/L; the label rate is one figure). */
const SKIP = new Set(['fromDKH', 'toDKH', 'labelAmount', 'labelUnit', 'labelPerLitres'])

const catalogueKey = (stem: string): ReadingKey | undefined =>
  ALIAS[stem.toLowerCase()] ?? READING_KEYS.find(k => k.toLowerCase() === stem.toLowerCase())

function figure(key: string, v: number, system: UnitSystem): string | null {
  const m = /^(current|from|target|to)([A-Z].*)$/.exec(key)
  const when = m ? (m[1] === 'current' || m[1] === 'from' ? ' now' : ' target') : ''
  const stem = m ? m[2]! : key
  const p = catalogueKey(stem)
  if (p) return `${PARAMETER_CATALOGUE[p].label}${when} ${formatParameter(p, v, system)}`
  const other = OTHER[stem] ?? OTHER[stem.charAt(0).toLowerCase() + stem.slice(1)]
  if (!other) return null
  const n = v * (other.scale ?? 1)
  const text = other.kind === 'volume' ? formatAmount('volume', n, system) : formatQuantity(other.kind, n, system, { digits: other.digits })
  return `${other.label}${when} ${text}`
}

/** The inputs of a dosing line as labelled figures; keys it does not know are left out, never printed raw. */
export function doseInputFigures(inputs: Record<string, number | string | null | undefined> | undefined, system: UnitSystem): string[] {
  if (!inputs) return []
  const out: string[] = []
  for (const [k, v] of Object.entries(inputs)) {
    if (SKIP.has(k) || typeof v !== 'number' || !Number.isFinite(v)) continue
    const f = figure(k, v, system)
    if (f) out.push(f)
  }
  const { labelAmount, labelUnit, labelPerLitres } = inputs
  if (typeof labelAmount === 'number' && typeof labelUnit === 'string' && typeof labelPerLitres === 'number') {
    out.push(`Label rate ${formatDose(labelAmount, labelUnit, system)} per ${formatAmount('volume', labelPerLitres, system)}`)
  }
  return out
}
