// Money is an integer count of minor units with an ISO 4217 currency. No floating point here.

const minorDigits = new Map<string, number>()
const moneyFormats = new Map<string, Intl.NumberFormat>()

/** Digits after the decimal point for a currency (2 for USD, 0 for JPY, 3 for BHD). */
export function currencyMinorDigits(currency: string): number {
  let digits = minorDigits.get(currency)
  if (digits === undefined) {
    digits = new Intl.NumberFormat('en', { style: 'currency', currency }).resolvedOptions().maximumFractionDigits ?? 2
    minorDigits.set(currency, digits)
  }
  return digits
}

/** 145000 USD → "$1,450.00". (Formatters are made once per locale and currency: batch e-mails format thousands.) */
export function formatMoney(minor: number, currency: string, locale = 'en-US'): string {
  const digits = currencyMinorDigits(currency)
  const key = `${locale}|${currency}`
  let format = moneyFormats.get(key)
  if (!format) moneyFormats.set(key, (format = new Intl.NumberFormat(locale, { style: 'currency', currency, minimumFractionDigits: digits, maximumFractionDigits: digits })))
  return format.format(minor / 10 ** digits)
}

/** "1,450.00" (or "1450", "1450.5") → 145000 minor units; NaN when it is not an amount. */
export function parseMoney(text: string, currency: string): number {
  const digits = currencyMinorDigits(currency)
  const m = text.replace(/[,\s]/g, '').replace(/^[^\d.]+/, '').match(new RegExp(`^(\\d+)(?:\\.(\\d{1,${Math.max(digits, 1)}}))?$`))
  if (!m || (digits === 0 && m[2])) return Number.NaN
  return Number(m[1]) * 10 ** digits + Number((m[2] ?? '').padEnd(digits, '0') || 0)
}
