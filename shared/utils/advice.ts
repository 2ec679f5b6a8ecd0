// Plain-words advice for customers from their feature's latest water test: what each result
// means, which way it is heading since the test before, what to do between visits, and when to
// call the company the same day. The same rules as the technician's suggestions
// (shared/utils/water/rules.ts, PRODUCT.md "Advice that does no harm"): aeration first, no KH buffer
// or pH product while un-ionized ammonia is at or above its watch level, feeding advice when
// ammonia or nitrite are high or the water is cold, lines ordered first things first. The actions
// are common pond-keeping practice (no published source); the thresholds are the feature's ranges.
import type { AdvicePriority, Parameter, ParameterEvaluation, ReadingEvaluation, ReadingStatus } from '../types/water'
import { formatLocalDate } from './company-time'
import { formatQuantity, type UnitSystem } from './water/format'
import { PARAMETER_CATALOGUE } from './water/parameters'
import {
  ammoniaHoldsBackKh, callUsToday, DEFAULT_NH3_WATCH_MGL, FEED_LIGHTLY_BELOW_C, parameterPriority, PRIORITY, STOP_FEEDING_BELOW_C, WARM_WATER_C,
} from './water/rules'

export type Trend = 'rising' | 'falling' | 'steady' | null

/** Customer words for each parameter (the catalogue's plain names). */
export const PARAMETER_WORDS: Record<Parameter, string> = Object.fromEntries(
  (Object.keys(PARAMETER_CATALOGUE) as Array<keyof typeof PARAMETER_CATALOGUE>).map(k => [k, PARAMETER_CATALOGUE[k].plain]),
) as Record<Parameter, string>

/** What a customer can do between visits when a result is off (common practice, no source). No act words here. */
const ACTIONS: Partial<Record<Parameter, { high?: string, low?: string }>> = {
  totalAmmoniaMgL: { high: 'add beneficial bacteria and cut back feeding (see the feeding advice)' },
  nh3MgL: { high: 'this is the form of ammonia that harms fish: add beneficial bacteria and cut back feeding (see the feeding advice)' },
  nitriteMgL: { high: 'add beneficial bacteria and cut back feeding (see the feeding advice)' },
  nitrateMgL: { high: 'change about a tenth of the water with dechlorinated water' },
  phosphateMgL: { high: 'feed less and remove dead leaves and blanket weed' },
  pH: { low: 'do not add pH products yourself; a KH buffer steadies pH', high: 'do not add pH products yourself' },
  khMgL: { low: 'add a KH buffer as the dosing helper works out' },
  dissolvedOxygenMgL: { low: 'run the waterfall or an air pump day and night' },
  doSaturationPct: { low: 'run the waterfall or an air pump day and night' },
  chlorineMgL: { high: 'add dechlorinator for the whole pond' },
  temperatureC: { high: 'shade part of the pond and keep the water moving', low: 'feed less: fish eat little in cold water' },
  saltGL: { high: 'add no more salt; only water changes lower it' },
}

/** While ammonia holds KH back (Emerson et al. 1975: a higher pH makes more of it toxic). */
const HELD_BACK: Partial<Record<Parameter, string>> = {
  khMgL: 'do not add a KH buffer yet: it raises pH, and that makes the ammonia more harmful. KH comes once ammonia is down',
  pH: 'do not add pH or KH products while ammonia is high; KH comes once ammonia is down',
}

/** Relative change below which a value counts as steady. */
const STEADY = 0.1

export function trendOf(now: number | null | undefined, before: number | null | undefined): Trend {
  if (now == null || before == null) return null
  const scale = Math.max(Math.abs(before), Math.abs(now), 1e-9)
  if (Math.abs(now - before) / scale < STEADY) return 'steady'
  return now > before ? 'rising' : 'falling'
}

/** Topics of lines that are not about one result. (KH waiting for ammonia is said on the KH and pH lines.) */
export type AdviceTopic = 'aeration' | 'feeding'

export interface AdviceLine {
  /** Unique within one advice: the parameter, or the topic of a line that is not about one result. */
  key: Parameter | AdviceTopic
  /** The result the line is about (for a topic line, the result that called for it). */
  parameter: Parameter
  status: ReadingStatus
  trend: Trend
  /** 1 oxygen, 2 ammonia and nitrite, 3 pH, 4 KH, 5 the rest: lines come in this order, results that are off first. */
  priority: AdvicePriority
  text: string
}
export interface Advice {
  overall: ReadingStatus
  /** One sentence for the feature's card. */
  headline: string
  lines: AdviceLine[]
  /** Something is in the "act" band: call the company today. */
  callUs: boolean
}

export interface AdviceOptions {
  /** The company's unit system for every figure (default 'metric'). */
  unitSystem?: UnitSystem
  /** The company's phone number, said with every "call us today". */
  phone?: string | null
  /** The test's computed values (un-ionized ammonia), when the evaluation has no line for them. */
  computed?: ReadingEvaluation['computed']
  /** Watch level of un-ionized ammonia, mg/L as NH3 (default: the 0.02 mg/L chronic limit, common practice). */
  nh3WatchMgL?: number | null
}

export { callUsToday }

const fmtDay = (d: string) => formatLocalDate(d, 'weekdayMonthDay')
const RANK: Record<ReadingStatus, number> = { ok: 0, watch: 1, act: 2 }
const isOff = (p: ParameterEvaluation) => p.status !== 'ok'
const isHigh = (p: ParameterEvaluation) => p.limit == null || p.value > p.limit

/**
 * Advice from a test's evaluation. `previous` holds the values of the test before (by parameter)
 * for the trend; `nextVisit` (a company-local date) is when the company will retest.
 */
export function adviceFor(
  evaluation: readonly ParameterEvaluation[],
  previous: Partial<Record<Parameter, number | null>>,
  nextVisit: string | null,
  opts: AdviceOptions = {},
): Advice {
  const system = opts.unitSystem ?? 'metric'
  const callUs = `${callUsToday(opts.phone)} `
  const retest = nextVisit ? `we will retest on ${fmtDay(nextVisit)}` : 'we will retest at the next visit'
  const byParameter = new Map(evaluation.map(p => [p.parameter, p]))
  const nh3Line = byParameter.get('nh3MgL')
  const nh3 = nh3Line?.value ?? opts.computed?.nh3MgL ?? null
  const nh3Watch = opts.nh3WatchMgL ?? DEFAULT_NH3_WATCH_MGL
  const ammoniaOff = [byParameter.get('totalAmmoniaMgL'), nh3Line].some(p => p !== undefined && isOff(p) && isHigh(p))
  const nitriteOff = byParameter.get('nitriteMgL')
  const holdsBack = (nh3Line !== undefined && isOff(nh3Line)) || ammoniaHoldsBackKh(nh3, nh3Watch, ammoniaOff)
  const temp = byParameter.get('temperatureC')?.value ?? null

  const lines: AdviceLine[] = evaluation.map((p) => {
    const trend = trendOf(p.value, previous[p.parameter])
    const word = PARAMETER_WORDS[p.parameter]
    const high = isHigh(p)
    const base = { key: p.parameter, parameter: p.parameter, status: p.status, trend, priority: parameterPriority(p.parameter, high) }
    if (p.status === 'ok') return { ...base, text: `${word} is fine${trend === 'rising' || trend === 'falling' ? ` (${trend})` : ''}.` }
    const held = !high && holdsBack ? HELD_BACK[p.parameter] : undefined
    const action = held ?? (high ? ACTIONS[p.parameter]?.high : ACTIONS[p.parameter]?.low) ?? 'keep an eye on the fish'
    const state = trend === 'rising' || trend === 'falling' ? `is ${trend}` : high ? 'is high' : 'is low'
    return { ...base, text: `${word} ${state}: ${action}; ${retest}.` }
  })

  // Un-ionized ammonia at or above its watch level is a watch-level fact even without a line of its own.
  const nh3High = nh3 !== null && nh3 >= nh3Watch
  const nh3Status: ReadingStatus[] = nh3High ? ['watch'] : []
  // Aeration first when ammonia is high in warm water (low oxygen has its own line above).
  const tempLine = byParameter.get('temperatureC')
  if (temp !== null && temp >= WARM_WATER_C && (ammoniaOff || nh3High)) {
    const ammonia = [byParameter.get('totalAmmoniaMgL'), nh3Line].filter(isDefined)
    lines.push({
      key: 'aeration', parameter: tempLine ? 'temperatureC' : 'nh3MgL', status: worstOf([...ammonia, ...nh3Status.map(status => ({ status }))]),
      trend: null, priority: PRIORITY.oxygen,
      text: `Keep the water moving first: run the waterfall or an air pump day and night. Warm water (${formatQuantity('temperature', temp, system)}) holds less oxygen, and fish need more of it while ammonia is high.`,
    })
  }
  // Feeding: ammonia or nitrite above the watch level, or cold water (common practice).
  const feedingFor = [byParameter.get('totalAmmoniaMgL'), nh3Line, nitriteOff].filter(isDefined).filter(p => isOff(p) && isHigh(p))
  const toxic = feedingFor.length > 0 || nh3High
  const cold = temp !== null && temp < FEED_LIGHTLY_BELOW_C
  if (toxic || cold) {
    const about = (c: number) => formatQuantity('temperature', c, system, { digits: 0 })
    const text = temp !== null && temp < STOP_FEEDING_BELOW_C
      ? `Stop feeding until the water warms up: below about ${about(STOP_FEEDING_BELOW_C)} fish cannot digest food.`
      : toxic
        ? 'Feed lightly, only what the fish eat in a few minutes, until ammonia and nitrite are back in range; skip a day or two if they stay high.'
        : `Feed lightly, a few times a week: below about ${about(FEED_LIGHTLY_BELOW_C)} fish eat and digest little.`
    lines.push({
      key: 'feeding', parameter: feedingFor[0]?.parameter ?? (nh3High || !tempLine ? 'nh3MgL' : 'temperatureC'),
      status: worstOf([...feedingFor, ...nh3Status.map(status => ({ status }))]), trend: null,
      priority: toxic ? PRIORITY.ammonia : PRIORITY.other, text,
    })
  }

  const order = (l: AdviceLine) => (l.status === 'ok' ? 10 : 0) + l.priority
  const sorted = lines
    .map((l, i) => ({ l, i }))
    .sort((a, b) => order(a.l) - order(b.l) || RANK[b.l.status] - RANK[a.l.status] || a.i - b.i)
    .map(x => x.l)
  const worst = worstOf(sorted)
  // "Call us today" once, on the first act line (with the phone number when there is one).
  const firstAct = sorted.findIndex(l => l.status === 'act')
  if (firstAct >= 0) sorted[firstAct] = { ...sorted[firstAct]!, text: `${callUs}${sorted[firstAct]!.text}` }
  const first = sorted.find(l => l.status === worst && worst !== 'ok')
  const headline = first ? first.text : evaluation.length ? 'Everything we tested is in range.' : lines.length ? sorted[0]!.text : 'No water test yet.'
  return { overall: worst, headline, lines: sorted, callUs: worst === 'act' }
}

function isDefined<T>(v: T | undefined): v is T {
  return v !== undefined
}

function worstOf(items: ReadonlyArray<{ status: ReadingStatus }>): ReadingStatus {
  return items.reduce<ReadingStatus>((w, p) => (RANK[p.status] > RANK[w] ? p.status : w), 'ok')
}
