// Recurring revenue from contracts: pure functions over contract rows, so each figure can be
// checked by hand. Money in minor units; sums are rounded once, at the end.
import { DateTime } from 'luxon'
import type { BillingCadence } from '../types/schedule'
import { addDays } from './recurrence'
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

/** Monthly recurring revenue on date d, rounded once to the minor unit. */
export function mrrOn(list: readonly RevenueContract[], d: string): number {
  return Math.round(list.filter(c => inForce(c, d)).reduce((s, c) => s + monthlyValue(c), 0))
}

function mrrByCustomer(list: readonly RevenueContract[], d: string) {
  const out = new Map<string, number>()
  for (const c of list) if (inForce(c, d)) out.set(c.customerId, (out.get(c.customerId) ?? 0) + monthlyValue(c))
  return out
}

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
  const mrrMinor = mrrOn(list, asOf)
  const live = list.filter(c => inForce(c, asOf))

  const started = list.filter(c => !c.previousContractId && c.status !== 'draft' && c.status !== 'paused' && c.termStart >= monthStart && c.termStart <= asOf && lastDayInForce(c) >= c.termStart)
  // A contract churns the day after its last day in force, unless a later term carries it on.
  const churned = list.filter((c) => {
    if (c.status === 'draft' || c.status === 'paused' || renewed.has(c.id)) return false
    const churnDay = addDays(lastDayInForce(c), 1)
    return lastDayInForce(c) >= c.termStart && churnDay >= monthStart && churnDay <= asOf
  })

  const yearAgo = month(asOf).minus({ years: 1 }).toISODate()!
  const before = mrrByCustomer(list, yearAgo)
  const nowByCustomer = mrrByCustomer(list, asOf)
  const base = [...before.values()].reduce((s, v) => s + v, 0)
  const kept = [...before.keys()].reduce((s, id) => s + (nowByCustomer.get(id) ?? 0), 0)

  const renewalsDue = ([30, 60, 90] as const).map((withinDays) => {
    const until = addDays(asOf, withinDays)
    const due = list.filter(c => c.status === 'active' && !renewed.has(c.id) && c.termEnd >= asOf && c.termEnd <= until)
    return { withinDays, count: due.length, autoRenew: due.filter(c => autoRenew.get(c.id)).length, mrrMinor: Math.round(due.reduce((s, c) => s + monthlyValue(c), 0)) }
  })

  const plans = new Map<string, { planId: string, planName: string, contracts: number, mrr: number }>()
  for (const c of live) {
    const p = plans.get(c.planId) ?? { planId: c.planId, planName: c.planName, contracts: 0, mrr: 0 }
    p.contracts++
    p.mrr += monthlyValue(c)
    plans.set(c.planId, p)
  }

  const mrrHistory = Array.from({ length: 12 }, (_, i) => {
    const m = month(asOf).startOf('month').minus({ months: 11 - i })
    const end = i === 11 ? asOf : m.endOf('month').toISODate()!
    return { month: m.toFormat('yyyy-MM'), mrrMinor: mrrOn(list, end) }
  })

  return {
    asOf, mrrMinor, arrMinor: mrrMinor * 12, activeContracts: live.filter(c => c.status === 'active').length,
    newThisMonth: { count: started.length, mrrMinor: Math.round(started.reduce((s, c) => s + monthlyValue(c), 0)) },
    churnedThisMonth: { count: churned.length, mrrMinor: Math.round(churned.reduce((s, c) => s + monthlyValue(c), 0)) },
    netRevenueRetention: base > 0 ? kept / base : null,
    renewalsDue,
    byPlan: [...plans.values()].map(p => ({ planId: p.planId, planName: p.planName, contracts: p.contracts, mrrMinor: Math.round(p.mrr) })).sort((a, b) => b.mrrMinor - a.mrrMinor),
    mrrHistory,
  }
}
