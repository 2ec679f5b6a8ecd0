// Recurring revenue from contracts: pure functions over contract rows, so each figure can be
// checked by hand. Money in minor units; sums are rounded once, at the end.
import { DateTime } from 'luxon'
import type { BillingCadence } from '../types/schedule'
import { monthlyValueMinor } from './billing'

export interface RevenueContract {
  id: string
  customerId: string
  planId: string
  planName: string
  cadence: BillingCadence
  /** Price per cadence period: the term (yearly), the month, or the visit. */
  priceMinor: number
  termMonths: number
  plannedVisits: number
  status: 'draft' | 'active' | 'paused' | 'ended' | 'cancelled'
  termStart: string
  termEnd: string
  /** Company-local date it was ended or cancelled, when it was. */
  endedOn: string | null
  previousContractId: string | null
}

/** The last day a contract counts: its term end, or the day before it was ended early. */
export function lastDayInForce(c: RevenueContract): string {
  if ((c.status === 'ended' || c.status === 'cancelled') && c.endedOn) {
    const dayBefore = addDays(c.endedOn, -1)
    return dayBefore < c.termEnd ? dayBefore : c.termEnd
  }
  return c.termEnd
}

/** Counts towards recurring revenue on date d: started, not over, and neither a draft nor paused. */
export function inForce(c: RevenueContract, d: string): boolean {
  if (c.status === 'draft' || c.status === 'paused') return false
  return c.termStart <= d && d <= lastDayInForce(c)
}

export const monthlyValue = (c: RevenueContract) => monthlyValueMinor(c)

/** A contract with its last day in force and monthly value worked out once (they are asked for many dates). */
interface Prepared { c: RevenueContract, first: string, last: string, counts: boolean, mv: number }
function prepare(list: readonly RevenueContract[]): Prepared[] {
  return list.map(c => ({ c, first: c.termStart, last: lastDayInForce(c), counts: c.status !== 'draft' && c.status !== 'paused', mv: monthlyValue(c) }))
}
const live = (p: Prepared, d: string) => p.counts && p.first <= d && d <= p.last

function mrrOfPrepared(list: readonly Prepared[], d: string): number {
  let sum = 0
  for (const p of list) if (live(p, d)) sum += p.mv
  return Math.round(sum)
}

/** Monthly recurring revenue on date d, rounded once to the minor unit. */
export function mrrOn(list: readonly RevenueContract[], d: string): number {
  return mrrOfPrepared(prepare(list), d)
}

function mrrByCustomer(list: readonly Prepared[], d: string) {
  const out = new Map<string, number>()
  for (const p of list) if (live(p, d)) out.set(p.c.customerId, (out.get(p.c.customerId) ?? 0) + p.mv)
  return out
}

/** Date arithmetic on ISO dates at UTC midnight: exact for whole days, and fast (it runs per contract). */
const addDays = (d: string, days: number) => new Date(Date.parse(`${d}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10)

const month = (d: string) => DateTime.fromISO(d, { zone: 'utc' })

export interface RevenueFigures {
  asOf: string
  mrrMinor: number
  arrMinor: number
  activeContracts: number
  newThisMonth: { count: number, mrrMinor: number }
  churnedThisMonth: { count: number, mrrMinor: number }
  /** Net revenue retention over the last 12 months, as a fraction (1.05 = 105 %); null without a cohort a year ago. */
  netRevenueRetention: number | null
  renewalsDue: Array<{ withinDays: 30 | 60 | 90, count: number, autoRenew: number, mrrMinor: number }>
  byPlan: Array<{ planId: string, planName: string, contracts: number, mrrMinor: number }>
  /** MRR at the end of each of the last 12 months (the current month: as of today). */
  mrrHistory: Array<{ month: string, mrrMinor: number }>
}

/**
 * Every contract-based figure of the revenue view as of a company-local date. `renewedIds` are
 * the contracts another contract renews (a renewed term does not churn; a renewal is not new).
 */
export function revenueFigures(list: readonly RevenueContract[], asOf: string, autoRenew: ReadonlyMap<string, boolean> = new Map()): RevenueFigures {
  const renewed = new Set(list.filter(c => c.previousContractId && c.status !== 'draft').map(c => c.previousContractId!))
  const monthStart = month(asOf).startOf('month').toISODate()!
  const all = prepare(list)
  const mrrMinor = mrrOfPrepared(all, asOf)
  const liveNow = all.filter(p => live(p, asOf))

  const started = all.filter(p => !p.c.previousContractId && p.counts && p.first >= monthStart && p.first <= asOf && p.last >= p.first)
  // A contract churns the day after its last day in force, unless a later term carries it on.
  const churned = all.filter((p) => {
    if (!p.counts || renewed.has(p.c.id) || p.last < p.first) return false
    const churnDay = addDays(p.last, 1)
    return churnDay >= monthStart && churnDay <= asOf
  })

  const yearAgo = month(asOf).minus({ years: 1 }).toISODate()!
  const before = mrrByCustomer(all, yearAgo)
  const nowByCustomer = mrrByCustomer(all, asOf)
  const base = [...before.values()].reduce((s, v) => s + v, 0)
  const kept = [...before.keys()].reduce((s, id) => s + (nowByCustomer.get(id) ?? 0), 0)

  const renewalsDue = ([30, 60, 90] as const).map((withinDays) => {
    const until = addDays(asOf, withinDays)
    const due = all.filter(p => p.c.status === 'active' && !renewed.has(p.c.id) && p.c.termEnd >= asOf && p.c.termEnd <= until)
    return { withinDays, count: due.length, autoRenew: due.filter(p => autoRenew.get(p.c.id)).length, mrrMinor: Math.round(due.reduce((s, p) => s + p.mv, 0)) }
  })

  const plans = new Map<string, { planId: string, planName: string, contracts: number, mrr: number }>()
  for (const { c, mv } of liveNow) {
    const p = plans.get(c.planId) ?? { planId: c.planId, planName: c.planName, contracts: 0, mrr: 0 }
    p.contracts++
    p.mrr += mv
    plans.set(c.planId, p)
  }

  const mrrHistory = Array.from({ length: 12 }, (_, i) => {
    const m = month(asOf).startOf('month').minus({ months: 11 - i })
    const end = i === 11 ? asOf : m.endOf('month').toISODate()!
    return { month: m.toFormat('yyyy-MM'), mrrMinor: mrrOfPrepared(all, end) }
  })

  return {
    asOf, mrrMinor, arrMinor: mrrMinor * 12, activeContracts: liveNow.filter(p => p.c.status === 'active').length,
    newThisMonth: { count: started.length, mrrMinor: Math.round(started.reduce((s, p) => s + p.mv, 0)) },
    churnedThisMonth: { count: churned.length, mrrMinor: Math.round(churned.reduce((s, p) => s + p.mv, 0)) },
    netRevenueRetention: base > 0 ? kept / base : null,
    renewalsDue,
    byPlan: [...plans.values()].map(p => ({ planId: p.planId, planName: p.planName, contracts: p.contracts, mrrMinor: Math.round(p.mrr) })).sort((a, b) => b.mrrMinor - a.mrrMinor),
    mrrHistory,
  }
}
