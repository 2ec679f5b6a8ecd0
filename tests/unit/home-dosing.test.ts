import { describe, expect, it } from 'vitest'
import { amountInUnits, homeDose } from '../../shared/utils/home-dosing'

// Label rates here are invented for the test (a real product's label decides); the chemistry is
// checked against ../shared/CHECKS.md: §4 (29.96 g NaHCO3 per 1000 L per dKH, C) and §5
// (1 g/L = 1 ppt, C). The "call us" thresholds are the product's (common practice, no source).
describe('the customer\'s dosing helper', () => {
  it('dechlorinator for a top-up at the label rate, and "call us" for a water change', () => {
    const label = { amount: 5, unit: 'mL', perLitres: 378.5 }
    const small = homeDose({ treatment: 'dechlorinator', volumeL: 4000, label, topUpL: 378.5 })
    expect(small.amount).toBeCloseTo(5, 9)
    expect(small.callUs).toBeNull()
    expect(small.cautions[0]).toMatch(/label first/)
    expect(homeDose({ treatment: 'dechlorinator', volumeL: 4000, label, topUpL: 1000 }).callUs).toMatch(/call us/i)
  })

  it('salt from the chemistry: 4,000 L from 0 to 1 ppt is 4 kg; above 0.3 % it says call us and caps the amount', () => {
    const s = homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 1 })
    expect(s).toMatchObject({ amount: 4, unit: 'kg', callUs: null })
    expect(s.cautions.join(' ')).toMatch(/plants and some fish/)
    const high = homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 5 })
    expect(high.callUs).toMatch(/call us/i)
    expect(high.amount).toBe(12)
  })

  it('KH buffer at most 1 dKH a day: 1000 L from 2 to 5 dKH is 29.96 g today (CHECKS §4)', () => {
    const k = homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 2 * 17.848, targetKhMgL: 5 * 17.848 })
    expect(k.amount).toBeCloseTo(29.96, 1)
    expect(k.notes[0]).toMatch(/today's amount/)
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 10, targetKhMgL: 80 }).callUs).toMatch(/crash/)
  })

  it('bacteria for the whole volume at the label rate', () => {
    expect(homeDose({ treatment: 'bacteria', volumeL: 3785, label: { amount: 30, unit: 'mL', perLitres: 3785 } }).amount).toBeCloseTo(30, 9)
  })

  it('shows amounts in the reader\'s units (1 lb = 453.59237 g, NIST; 1 US fl oz = 29.5735 mL)', () => {
    expect(amountInUnits(4, 'kg', 'us')).toBe('8.8 lb (4 kg)')
    expect(amountInUnits(30, 'mL', 'us')).toBe('1 fl oz (30 mL)')
    expect(amountInUnits(30, 'mL', 'metric')).toBe('30 mL')
    expect(amountInUnits(28.35, 'g', 'us')).toBe('1 oz (28 g)')
  })
})
