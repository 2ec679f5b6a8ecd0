// Plain-words advice for customers from their feature's latest water test: what each result
// means, which way it is heading since the test before, what to do between visits, and when to
// call the company the same day. The actions are common pond-keeping practice (no published
// source); the thresholds are the feature's own ranges (see shared/utils/water/profiles.ts).
import type { Parameter, ParameterEvaluation, ReadingStatus } from '../types/water'

export type Trend = 'rising' | 'falling' | 'steady' | null

/** Customer words for each parameter. */
export const PARAMETER_WORDS: Record<Parameter, string> = {
  temperatureC: 'Water temperature', pH: 'pH', totalAmmoniaMgL: 'Ammonia', nh3MgL: 'Free ammonia', nitriteMgL: 'Nitrite',
  nitrateMgL: 'Nitrate', khMgL: 'KH (buffering)', ghMgL: 'Hardness (GH)', dissolvedOxygenMgL: 'Oxygen', doSaturationPct: 'Oxygen',
  saltGL: 'Salt', chlorineMgL: 'Chlorine', phosphateMgL: 'Phosphate',
}

/** What a customer can do between visits when a result is off (common practice, no source). */
const ACTIONS: Partial<Record<Parameter, { high?: string, low?: string }>> = {
  totalAmmoniaMgL: { high: 'feed lightly (or not at all for a day or two) and add beneficial bacteria' },
  nh3MgL: { high: 'stop feeding for now and add beneficial bacteria' },
  nitriteMgL: { high: 'feed lightly and add beneficial bacteria' },
  nitrateMgL: { high: 'change about a tenth of the water with dechlorinated water' },
  phosphateMgL: { high: 'feed less and remove dead leaves and blanket weed' },
  pH: { low: 'do not add pH products yourself; a KH buffer steadies pH', high: 'do not add pH products yourself' },
  khMgL: { low: 'add a KH buffer as the dosing helper works out' },
  dissolvedOxygenMgL: { low: 'run the waterfall or an air pump day and night' },
  doSaturationPct: { low: 'run the waterfall or an air pump day and night' },
  chlorineMgL: { high: 'add dechlorinator for the whole pond now' },
  temperatureC: { high: 'shade part of the pond and keep the water moving', low: 'feed less: fish eat little in cold water' },
  saltGL: { high: 'add no more salt; only water changes lower it' },
}

/** Relative change below which a value counts as steady. */
const STEADY = 0.1

export function trendOf(now: number | null | undefined, before: number | null | undefined): Trend {
  if (now == null || before == null) return null
  const scale = Math.max(Math.abs(before), Math.abs(now), 1e-9)
  if (Math.abs(now - before) / scale < STEADY) return 'steady'
  return now > before ? 'rising' : 'falling'
}

export interface AdviceLine { parameter: Parameter, status: ReadingStatus, trend: Trend, text: string }
export interface Advice {
  overall: ReadingStatus
  /** One sentence for the feature's card. */
  headline: string
  lines: AdviceLine[]
  /** Something is in the "act" band: call the company today. */
  callUs: boolean
}

const fmtDay = (d: string) => new Intl.DateTimeFormat('en-US', { weekday: 'short', month: 'short', day: 'numeric', timeZone: 'UTC' }).format(new Date(`${d}T12:00:00Z`))

/**
 * Advice from a test's evaluation. `previous` holds the values of the test before (by parameter)
 * for the trend; `nextVisit` (a company-local date) is when the company will retest.
 */
export function adviceFor(evaluation: readonly ParameterEvaluation[], previous: Partial<Record<Parameter, number | null>>, nextVisit: string | null): Advice {
  const retest = nextVisit ? `we will retest on ${fmtDay(nextVisit)}` : 'we will retest at the next visit'
  const lines: AdviceLine[] = evaluation.map((p) => {
    const trend = trendOf(p.value, previous[p.parameter])
    const word = PARAMETER_WORDS[p.parameter]
    if (p.status === 'ok') return { parameter: p.parameter, status: p.status, trend, text: `${word} is fine${trend === 'rising' || trend === 'falling' ? ` (${trend})` : ''}.` }
    const high = p.limit == null || p.value > p.limit
    const action = (high ? ACTIONS[p.parameter]?.high : ACTIONS[p.parameter]?.low) ?? 'keep an eye on the fish'
    const state = trend === 'rising' || trend === 'falling' ? `is ${trend}` : high ? 'is high' : 'is low'
    const lead = p.status === 'act' ? 'Call us today. ' : ''
    return { parameter: p.parameter, status: p.status, trend, text: `${lead}${word} ${state}: ${action}; ${retest}.` }
  })
  const worst: ReadingStatus = lines.some(l => l.status === 'act') ? 'act' : lines.some(l => l.status === 'watch') ? 'watch' : 'ok'
  const first = lines.find(l => l.status === worst && worst !== 'ok')
  const headline = first ? first.text : lines.length ? 'Everything we tested is in range.' : 'No water test yet.'
  return { overall: worst, headline, lines, callUs: worst === 'act' }
}
