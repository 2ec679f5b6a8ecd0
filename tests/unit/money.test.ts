import { describe, expect, it } from 'vitest'
import { currencyMinorDigits, formatMoney, parseMoney } from '../../shared/utils/money'

describe('money in minor units (ISO 4217 minor-unit digits)', () => {
  it('knows the minor digits of a few currencies (ISO 4217 table: USD 2, JPY 0, BHD 3)', () => {
    expect(currencyMinorDigits('USD')).toBe(2)
    expect(currencyMinorDigits('JPY')).toBe(0)
    expect(currencyMinorDigits('BHD')).toBe(3)
  })
  it('formats and parses exactly', () => {
    expect(formatMoney(145000, 'USD')).toBe('$1,450.00')
    expect(formatMoney(5, 'USD')).toBe('$0.05')
    expect(parseMoney('1,450.00', 'USD')).toBe(145000)
    expect(parseMoney('$1450.5', 'USD')).toBe(145050)
    expect(parseMoney('0.07', 'USD')).toBe(7)
    expect(parseMoney('1200', 'JPY')).toBe(1200)
    expect(parseMoney('12.5', 'JPY')).toBeNaN()
    expect(parseMoney('1.2.3', 'USD')).toBeNaN()
    // 0.1 + 0.2 style errors cannot happen: 19.99 is 1999, not 1998.9999.
    expect(parseMoney('19.99', 'USD')).toBe(1999)
  })
})
