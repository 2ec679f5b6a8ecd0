// How a dosing line of the advice engine is shown: its amount in the company's units and its
// cautions, always with the cautions of handling chemicals (PRODUCT.md, Safety).
import { formatAmount, formatDose, type UnitSystem } from '#shared/utils/water-chemistry'

/** A dosing line as the engine (or the evaluate endpoint) sends it; newer fields are optional. */
export interface DoseLine {
  key: string
  product: string
  amount: number | null
  unit: string
  reason: string
  cautions: string[]
  /** The amount already worded in the company's units (newer engines send it). */
  amountText?: string | null
  priority?: number
  inputs?: Record<string, number | string>
  productId?: string | null
}

/** Wherever a chemical is dosed: the one list (shared/utils/safety.ts). */
export const CHEMICAL_CAUTIONS = CHEMICAL_SAFETY

/** Lines that add a chemical (not water, feeding or aeration advice). */
export const isChemical = (line: Pick<DoseLine, 'key' | 'amount'>) =>
  line.amount != null && !line.key.startsWith('water_change') && !['aeration', 'feeding', 'kh_after_ammonia'].includes(line.key)

/** The amount to read: the engine's own words when it sends them, else the amount in the company's units. */
export function doseText(line: Pick<DoseLine, 'amount' | 'unit' | 'amountText'>, system: UnitSystem): string {
  if (line.amountText) return line.amountText
  if (line.amount == null) return ''
  return line.unit === 'L' ? formatAmount('volume', line.amount, system) : formatDose(line.amount, line.unit, system)
}

/** The line's cautions, with the chemical-handling ones added where a chemical is dosed (no repeats). */
export function withChemicalCautions(line: Pick<DoseLine, 'key' | 'amount' | 'cautions'>): string[] {
  const own = line.cautions ?? []
  if (!isChemical(line)) return own
  return withCautions(own, CHEMICAL_CAUTIONS)
}

/** `own` followed by those of `more` it does not already say (compared without the final stop). */
export function withCautions(own: readonly string[], more: readonly string[]): string[] {
  const bare = (c: string) => c.replace(/[.!?]$/, '').toLowerCase()
  const said = new Set(own.map(bare))
  return [...own, ...more.filter(c => !said.has(bare(c)))]
}
