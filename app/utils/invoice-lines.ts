import type { LineKind } from '#shared/types/billing'
import type { EditableLine } from '~/components/invoices/LinesEditor.vue'

/** Form lines (text as typed) → the API's lines (numbers in minor units); bad text stays NaN for zod to name. */
export function toApiLines(lines: EditableLine[], currency: string) {
  return lines.map((l) => {
    const negative = l.unitPrice.trim().startsWith('-')
    const minor = parseMoney(l.unitPrice.replace('-', ''), currency)
    return { kind: l.kind, description: l.description, quantity: Number(l.quantity), unitPriceMinor: negative ? -minor : minor, taxable: l.taxable }
  })
}

/** The API's lines → form lines. */
export function fromApiLines(lines: Array<{ kind: LineKind, description: string, quantity: number, unitPriceMinor: number, taxable: boolean }>, currency: string): EditableLine[] {
  const digits = currencyMinorDigits(currency)
  return lines.map(l => ({ kind: l.kind, description: l.description, quantity: String(l.quantity), unitPrice: (l.unitPriceMinor / 10 ** digits).toFixed(digits), taxable: l.taxable }))
}
