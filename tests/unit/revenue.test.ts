import { describe, expect, it } from 'vitest'
import { inForce, lastDayInForce, mrrOn, revenueFigures, type RevenueContract } from '../../shared/utils/revenue'

// A small hand-built book of contracts; every expected figure below is worked out by hand in the
// comments (invented data, the product's definitions as shown on the revenue page).
const base = { termMonths: 12, plannedVisits: 0, endedOn: null, previousContractId: null }
const book: RevenueContract[] = [
  // c1: last year's yearly term $1,200 (→ $100/mo), renewed at $1,320 (→ $110/mo).
  { ...base, id: 'A', customerId: 'c1', planId: 'p-year', planName: 'Yearly', cadence: 'yearly', priceMinor: 120_000, status: 'ended', termStart: '2025-03-01', termEnd: '2026-02-28', endedOn: '2026-03-01' },
  { ...base, id: 'A2', customerId: 'c1', planId: 'p-year', planName: 'Yearly', cadence: 'yearly', priceMinor: 132_000, status: 'active', termStart: '2026-03-01', termEnd: '2027-02-28', previousContractId: 'A' },
  // c2: monthly $200, ends 2026-06-30 and does not renew by itself.
  { ...base, id: 'B', customerId: 'c2', planId: 'p-month', planName: 'Monthly', cadence: 'monthly', priceMinor: 20_000, status: 'active', termStart: '2025-07-01', termEnd: '2026-06-30' },
  // c3: new this month, per visit $300 × 2 planned visits over 12 months → $50/mo.
  { ...base, id: 'C', customerId: 'c3', planId: 'p-visit', planName: 'Per visit', cadence: 'per_visit', priceMinor: 30_000, plannedVisits: 2, status: 'active', termStart: '2026-06-01', termEnd: '2027-05-31' },
  // c4: yearly $600 (→ $50/mo) from 2025-09-01, cancelled on 2026-06-10: churned this month.
  { ...base, id: 'D', customerId: 'c4', planId: 'p-year', planName: 'Yearly', cadence: 'yearly', priceMinor: 60_000, status: 'cancelled', termStart: '2025-09-01', termEnd: '2026-08-31', endedOn: '2026-06-10' },
  // c5 paused and c6 a draft: they count for nothing.
  { ...base, id: 'E', customerId: 'c5', planId: 'p-month', planName: 'Monthly', cadence: 'monthly', priceMinor: 10_000, status: 'paused', termStart: '2026-01-01', termEnd: '2026-12-31' },
  { ...base, id: 'F', customerId: 'c6', planId: 'p-year', planName: 'Yearly', cadence: 'yearly', priceMinor: 99_000, status: 'draft', termStart: '2026-06-01', termEnd: '2027-05-31' },
]
const autoRenew = new Map([['A2', true], ['B', false], ['C', true]])
const asOf = '2026-06-15'

describe('recurring revenue on a hand-computed book', () => {
  const r = revenueFigures(book, asOf, autoRenew)

  it('a contract ended early stops counting the day it ended', () => {
    expect(lastDayInForce(book[4]!)).toBe('2026-06-09')
    expect(inForce(book[4]!, '2026-06-09')).toBe(true)
    expect(inForce(book[4]!, '2026-06-10')).toBe(false)
    expect(lastDayInForce(book[0]!)).toBe('2026-02-28')
  })

  it('MRR = $110 (A2) + $200 (B) + $50 (C) = $360; ARR = 12 × MRR', () => {
    expect(r.mrrMinor).toBe(36_000)
    expect(r.arrMinor).toBe(432_000)
  })

  it('active contracts: A2, B and C (paused, draft and ended ones left out)', () => {
    expect(r.activeContracts).toBe(3)
  })

  it('new this month: C only (A2 renews A, so it is not new)', () => {
    expect(r.newThisMonth).toEqual({ count: 1, mrrMinor: 5_000 })
  })

  it('churned this month: D (cancelled June 10, no next term); A was renewed', () => {
    expect(r.churnedThisMonth).toEqual({ count: 1, mrrMinor: 5_000 })
  })

  it('net revenue retention: a year ago only c1 had a contract in force ($100/mo); c1 now brings $110 → 110 %', () => {
    expect(r.netRevenueRetention).toBeCloseTo(1.1, 10)
  })

  it('renewals due: B ends on June 30 (within 30, 60 and 90 days), set to ask first', () => {
    expect(r.renewalsDue).toEqual([
      { withinDays: 30, count: 1, autoRenew: 0, mrrMinor: 20_000 },
      { withinDays: 60, count: 1, autoRenew: 0, mrrMinor: 20_000 },
      { withinDays: 90, count: 1, autoRenew: 0, mrrMinor: 20_000 },
    ])
  })

  it('MRR by plan, largest first', () => {
    expect(r.byPlan).toEqual([
      { planId: 'p-month', planName: 'Monthly', contracts: 1, mrrMinor: 20_000 },
      { planId: 'p-year', planName: 'Yearly', contracts: 1, mrrMinor: 11_000 },
      { planId: 'p-visit', planName: 'Per visit', contracts: 1, mrrMinor: 5_000 },
    ])
  })

  it('12-month MRR history at each month end: $300 (A+B) → $350 with D from September → $360 from March → $360 in June', () => {
    expect(r.mrrHistory.map(m => m.month)).toEqual(['2025-07', '2025-08', '2025-09', '2025-10', '2025-11', '2025-12', '2026-01', '2026-02', '2026-03', '2026-04', '2026-05', '2026-06'])
    expect(r.mrrHistory.map(m => m.mrrMinor / 100)).toEqual([300, 300, 350, 350, 350, 350, 350, 350, 360, 360, 360, 360])
  })

  it('rounds once: three yearly $1,000 terms are $250.00 a month, not 3 × $83.33', () => {
    const three = [1, 2, 3].map(i => ({ ...base, id: `y${i}`, customerId: `y${i}`, planId: 'p', planName: 'Y', cadence: 'yearly' as const, priceMinor: 100_000, status: 'active' as const, termStart: '2026-01-01', termEnd: '2026-12-31' }))
    expect(mrrOn(three, '2026-06-01')).toBe(25_000)
  })

  it('has no retention figure without a cohort a year ago', () => {
    expect(revenueFigures(book.filter(c => c.id === 'C'), asOf).netRevenueRetention).toBeNull()
  })
})
