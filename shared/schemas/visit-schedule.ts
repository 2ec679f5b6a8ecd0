// A plan visit template's timing as the stored window form (visit-windows.ts): the rhythm, the
// season and the tolerance. Rules written before windows existed (an RRULE with BYMONTH, BYDAY…)
// are read through templateVisitSchedule(): their months become the season and their FREQ and
// INTERVAL the rhythm; the migration that added the window columns uses the same reading.
import { parseVisitSchedule, type VisitSchedule } from '../utils/visit-windows'

const pad = (n: number) => String(n).padStart(2, '0')
const MONTH_LAST_DAY = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31] as const

/** True when the rule text carries more than FREQ and INTERVAL (a rule from before windows). */
export function isLegacyVisitRule(rrule: string): boolean {
  return rrule.trim().replace(/^RRULE:/i, '').toUpperCase().split(';').filter(Boolean)
    .some(part => !/^(FREQ|INTERVAL)=/.test(part))
}

/** The season a set of months covers: from the first month after a gap to the last month before it. */
export function seasonOfMonths(months: readonly number[]): { from: string, to: string } {
  const set = new Set(months.filter(m => Number.isInteger(m) && m >= 1 && m <= 12))
  if (set.size === 0 || set.size === 12) return { from: '01-01', to: '12-31' }
  const prev = (m: number) => (m + 10) % 12 + 1
  const start = [...set].sort((a, b) => a - b).find(m => !set.has(prev(m)))!
  let end = prev(start)
  while (!set.has(end)) end = prev(end)
  return { from: `${pad(start)}-01`, to: `${pad(end)}-${MONTH_LAST_DAY[end - 1]}` }
}

/** A rule from before windows → the window form (tolerance 0). */
export function legacyRuleToVisitSchedule(rrule: string): VisitSchedule {
  const parts = new Map(rrule.trim().replace(/^RRULE:/i, '').toUpperCase().split(';').filter(Boolean).map(p => p.split('=') as [string, string]))
  const freq = parts.get('FREQ') ?? 'YEARLY'
  const interval = Math.min(52, Math.max(1, Number(parts.get('INTERVAL') ?? 1) || 1))
  const months = (parts.get('BYMONTH') ?? '').split(',').filter(Boolean).map(Number)
  const season = seasonOfMonths(months)
  const rhythm = freq === 'YEARLY' ? 'FREQ=YEARLY' : `FREQ=${freq}${interval > 1 ? `;INTERVAL=${interval}` : ''}`
  return parseVisitSchedule({ rrule: rhythm, ...season, toleranceDays: 0 })
}

/** A stored template row → its schedule. */
export function templateVisitSchedule(t: { rrule: string, seasonFrom: string, seasonTo: string, toleranceDays: number }): VisitSchedule {
  if (isLegacyVisitRule(t.rrule)) return legacyRuleToVisitSchedule(t.rrule)
  return parseVisitSchedule({ rrule: t.rrule, from: t.seasonFrom, to: t.seasonTo, toleranceDays: t.toleranceDays })
}
