import { describe, expect, it } from 'vitest'
import { homeDose } from '../../shared/utils/home-dosing'
import { foreignUnitsIn, stringsIn } from '../helpers/units-scan'

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
    expect(small.amountText).toBe('5 mL')
    expect(small.cautions).toContain('Treat the whole top-up volume, every time you add tap water.')
    expect(homeDose({ treatment: 'dechlorinator', volumeL: 4000, label, topUpL: 1000 }).callUs).toMatch(/call us/i)
  })

  it('salt from the chemistry: 4,000 L from 0 to 1 ppt is 4 kg; above 0.3 % it says call us and caps the amount', () => {
    const s = homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 1 })
    expect(s).toMatchObject({ amount: 4, unit: 'kg', callUs: null })
    expect(homeDose({ treatment: 'salt', volumeL: 4000 }).amount).toBe(4) // defaults: from 0 to 1 g/L
    expect(homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0.5, targetSaltPpt: 3 }).callUs).toBeNull()
    expect(s.notes[0]).toMatch(/three parts/)
    expect(s.cautions.join(' ')).toMatch(/plants and some fish/)
    const high = homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 5 })
    expect(high.callUs).toMatch(/call us/i)
    expect(high.amount).toBe(12)
  })

  it('KH buffer at most 1 dKH a day: 1000 L from 2 to 5 dKH is 29.96 g today (CHECKS §4)', () => {
    const k = homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 2 * 17.848, targetKhMgL: 5 * 17.848 })
    expect(k.amount).toBeCloseTo(29.96, 1)
    expect(k.notes[0]).toMatch(/today's amount/)
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 4 * 17.848, targetKhMgL: 4.5 * 17.848 }).amount).toBeCloseTo(29.96 / 2, 1)
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 4 * 17.848, targetKhMgL: 4.5 * 17.848 }).notes).toEqual([])
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 100 }).amount).toBe(0) // default target 100 mg/L
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 10, targetKhMgL: 80 }).callUs).toMatch(/crash/)
  })

  it('bacteria for the whole volume at the label rate', () => {
    const b = homeDose({ treatment: 'bacteria', volumeL: 3785, label: { amount: 30, unit: 'mL', perLitres: 3785 } })
    expect(b.amount).toBeCloseTo(30, 9)
    expect(b.unit).toBe('mL')
    expect(b.notes[0]).toMatch(/filter or the waterfall/)
    expect(() => homeDose({ treatment: 'bacteria', volumeL: 3785 })).toThrow(/label rate/)
    expect(() => homeDose({ treatment: 'dechlorinator', volumeL: 3785, topUpL: 10 })).toThrow(/label rate/)
  })

  it('amountText in the company\'s units, rounded to what can be measured out (NIST HB 44: 1 lb = 453.59237 g, 1 US fl oz = 29.5735 mL)', () => {
    expect(homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 1, unitSystem: 'us' }).amountText).toBe('8.8 lb')
    expect(homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 1 }).amountText).toBe('4 kg')
    expect(homeDose({ treatment: 'bacteria', volumeL: 3785, label: { amount: 30, unit: 'mL', perLitres: 3785 }, unitSystem: 'us' }).amountText).toBe('1 fl oz')
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 40, targetKhMgL: 100, unitSystem: 'us' }).amountText).toBe('1.1 oz') // 29.96 g
  })

  it('every sentence in the system\'s units', () => {
    for (const unitSystem of ['us', 'metric'] as const) {
      const all = [
        homeDose({ treatment: 'salt', volumeL: 4000, currentSaltPpt: 0, targetSaltPpt: 5, unitSystem }),
        homeDose({ treatment: 'kh_buffer', volumeL: 4000, currentKhMgL: 10, targetKhMgL: 100, unitSystem, phone: '555-0142' }),
        homeDose({ treatment: 'kh_buffer', volumeL: 4000, currentKhMgL: 60, unitSystem, latest: { nh3MgL: 0.1, nh3WatchMgL: 0.02 } }),
        homeDose({ treatment: 'dechlorinator', volumeL: 4000, label: { amount: 5, unit: 'mL', perLitres: 400 }, topUpL: 1000, unitSystem }),
      ]
      expect(foreignUnitsIn(stringsIn(all, new Set(['unit'])), unitSystem)).toEqual([])
    }
    expect(homeDose({ treatment: 'salt', volumeL: 4000, targetSaltPpt: 5, unitSystem: 'us' }).callUs).toBe('More than 0.3 % salt is a treatment: call us first.')
    expect(homeDose({ treatment: 'salt', volumeL: 4000, targetSaltPpt: 5 }).callUs).toBe('More than 3 g/L salt is a treatment: call us first.')
  })

  it('"call us today" with the company\'s number', () => {
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 10, phone: '555-0142' }).callUs).toBe('KH this low can let pH crash. Call us today on 555-0142.')
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 10 }).callUs).toBe('KH this low can let pH crash. Call your pond company today.')
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 18 }).callUs).toBeNull()
  })

  it('no KH buffer while un-ionized ammonia is at or above its watch level (Emerson et al. 1975)', () => {
    const held = homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 40, latest: { nh3MgL: 0.05, nh3WatchMgL: 0.05 } })
    expect(held).toMatchObject({ amount: 0, amountText: '' })
    expect(held.callUs).toMatch(/KH can be raised once ammonia is down/)
    expect(held.notes[0]).toMatch(/Bring ammonia down first/)
    expect(held.cautions.join(' ')).not.toMatch(/1 dKH a day/)
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 40, latest: { nh3MgL: 0.049, nh3WatchMgL: 0.05 } }).amount).toBeCloseTo(29.96, 1)
    expect(homeDose({ treatment: 'kh_buffer', volumeL: 1000, currentKhMgL: 40, latest: { nh3MgL: null } }).amount).toBeCloseTo(29.96, 1)
  })
})
