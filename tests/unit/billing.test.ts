import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  daysBetween, divRoundHalfAway, formatTaxRate, invoiceTotals, lineAmountMinor, monthlyPeriods, monthlyValueMinor,
  receivableBucket, reminderStageFor,
} from '../../shared/utils/billing'
import { addDays, addMonths } from '../../shared/utils/company-time'

// Rounding rule: tax to the nearest cent, halves away from zero, once per invoice. Sales-tax
// rules commonly round to the nearest cent with a half cent rounded up and let the seller round
// per invoice rather than per item (e.g. the Streamlined Sales and Use Tax Agreement's rounding
// rule, from memory). The product states its rule; these tests hold it to it.

describe('integer rounding', () => {
  it('rounds halves away from zero, on integers only', () => {
    expect(divRoundHalfAway(25, 10)).toBe(3)
    expect(divRoundHalfAway(-25, 10)).toBe(-3)
    expect(divRoundHalfAway(24, 10)).toBe(2)
    expect(divRoundHalfAway(26, 10)).toBe(3)
    expect(divRoundHalfAway(0, 7)).toBe(0)
    expect(() => divRoundHalfAway(1.5, 10)).toThrow(RangeError)
  })
  it('is never more than half a unit from the exact quotient (property)', () => {
    fc.assert(fc.property(fc.integer({ min: -1e12, max: 1e12 }), fc.integer({ min: 1, max: 1e6 }), (n, d) => {
      const r = divRoundHalfAway(n, d)
      expect(Math.abs(r * d - n) * 2).toBeLessThanOrEqual(d)
    }))
  })
})

describe('invoice lines and totals', () => {
  it('multiplies quantity by unit price to the cent (quantities with two decimals)', () => {
    expect(lineAmountMinor(1, 145_000)).toBe(145_000)
    expect(lineAmountMinor(1.5, 3_333)).toBe(5_000) // 4999.5 → 5000
    expect(lineAmountMinor(2.25, 1_999)).toBe(4_498) // 4497.75 → 4498
    expect(lineAmountMinor(0.1, 7)).toBe(1) // 0.7 → 1; no binary-fraction drift
    expect(lineAmountMinor(3, -500)).toBe(-1_500)
  })

  it('computes tax per line at full precision and rounds once for the invoice', () => {
    // Hand-computed: 3.33 + 3.33 + 3.34 = 10.00 taxable at 7.25 %: exact line taxes 0.241425 +
    // 0.241425 + 0.24215 = 0.725 → $0.73 once. Rounding each line would give 0.24 × 3 = $0.72.
    const t = invoiceTotals([
      { quantity: 1, unitPriceMinor: 333, taxable: true },
      { quantity: 1, unitPriceMinor: 333, taxable: true },
      { quantity: 1, unitPriceMinor: 334, taxable: true },
    ], 725)
    expect(t.subtotalMinor).toBe(1_000)
    expect(t.taxMinor).toBe(73)
    expect(t.totalMinor).toBe(1_073)
  })

  it('leaves untaxed lines out of the tax and lets a discount lower it', () => {
    // $189.00 plan at 7.25 % = 13.7025 → $13.70; a $50 untaxed labour line adds no tax.
    expect(invoiceTotals([{ quantity: 1, unitPriceMinor: 18_900, taxable: true }, { quantity: 1, unitPriceMinor: 5_000, taxable: false }], 725))
      .toMatchObject({ subtotalMinor: 23_900, taxableMinor: 18_900, taxMinor: 1_370, totalMinor: 25_270 })
    // $1,450.00 less a $100.00 taxed discount: 1,350.00 × 7.25 % = 97.875 → $97.88.
    expect(invoiceTotals([{ quantity: 1, unitPriceMinor: 145_000, taxable: true }, { quantity: 1, unitPriceMinor: -10_000, taxable: true }], 725).taxMinor).toBe(9_788)
  })

  it('keeps the invoice tax within half a cent of rate × taxable subtotal however many lines (property)', () => {
    fc.assert(fc.property(
      fc.array(fc.record({ quantity: fc.integer({ min: 1, max: 40 }), unitPriceMinor: fc.integer({ min: 0, max: 500_000 }), taxable: fc.boolean() }), { minLength: 1, maxLength: 60 }),
      fc.integer({ min: 0, max: 2_000 }),
      (lines, bp) => {
        const t = invoiceTotals(lines, bp)
        expect(Math.abs(t.taxMinor * 10_000 - t.taxableMinor * bp) * 2).toBeLessThanOrEqual(10_000)
        expect(t.totalMinor).toBe(t.subtotalMinor + t.taxMinor)
      },
    ))
  })

  it('prints the rate as a percentage', () => {
    expect(formatTaxRate(725)).toBe('7.25 %')
    expect(formatTaxRate(800)).toBe('8 %')
    expect(formatTaxRate(750)).toBe('7.5 %')
    expect(formatTaxRate(0)).toBe('0 %')
  })
})

describe('billing periods and dates', () => {
  it('cuts a March-to-February term into twelve calendar months', () => {
    const p = monthlyPeriods('2026-03-01', '2027-02-28')
    expect(p).toHaveLength(12)
    expect(p[0]).toEqual({ start: '2026-03-01', end: '2026-03-31' })
    expect(p[11]).toEqual({ start: '2027-02-01', end: '2027-02-28' })
  })
  it('keeps month-end starts at the month end (Jan 31 → Feb 28) and cuts the last period at the term end', () => {
    expect(addMonths('2026-01-31', 1)).toBe('2026-02-28')
    const p = monthlyPeriods('2026-01-31', '2026-04-15')
    expect(p.map(x => x.start)).toEqual(['2026-01-31', '2026-02-28', '2026-03-31'])
    expect(p.at(-1)!.end).toBe('2026-04-15')
  })
  it('covers any term with no gap and no overlap (property)', () => {
    fc.assert(fc.property(fc.date({ min: new Date('2020-01-01'), max: new Date('2035-12-31'), noInvalidDate: true }), fc.integer({ min: 1, max: 36 }), (d, months) => {
      const start = d.toISOString().slice(0, 10)
      const end = addDays(addMonths(start, months), -1)
      const p = monthlyPeriods(start, end)
      expect(p[0]!.start).toBe(start)
      expect(p.at(-1)!.end).toBe(end)
      for (let i = 1; i < p.length; i++) expect(p[i]!.start).toBe(addDays(p[i - 1]!.end, 1))
      expect(p.length).toBe(months)
    }))
  })
  it('counts days between local dates', () => {
    expect(daysBetween('2026-11-30', '2026-12-07')).toBe(7)
    expect(daysBetween('2026-03-07', '2026-03-09')).toBe(2) // across the daylight-saving change
  })
})

describe('reminders and ageing', () => {
  it('reaches reminder stages at 7, 14 and 30 days overdue', () => {
    expect([0, 6, 7, 13, 14, 29, 30, 400].map(reminderStageFor)).toEqual([0, 0, 1, 1, 2, 2, 3, 3])
  })
  it('ages receivables: current until due, then 1–30, 31–60, 61–90, 90+', () => {
    expect([-5, 0, 1, 30, 31, 60, 61, 90, 91].map(receivableBucket)).toEqual(['current', 'current', '1-30', '1-30', '31-60', '31-60', '61-90', '61-90', '90+'])
  })
})

describe('monthly value of a contract (the product\'s definition)', () => {
  it('spreads a yearly price over the term, counts monthly prices, and per-visit price × planned visits over the term', () => {
    expect(monthlyValueMinor({ cadence: 'yearly', priceMinor: 145_000, termMonths: 12, plannedVisits: 0 })).toBeCloseTo(12_083.333, 3)
    expect(monthlyValueMinor({ cadence: 'monthly', priceMinor: 18_900, termMonths: 12, plannedVisits: 0 })).toBe(18_900)
    expect(monthlyValueMinor({ cadence: 'per_visit', priceMinor: 32_500, termMonths: 12, plannedVisits: 2 })).toBeCloseTo(5_416.667, 3)
  })
})
