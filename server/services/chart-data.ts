import { and, asc, eq, gte, sql, type SQL } from 'drizzle-orm'
import { DateTime } from 'luxon'
import { addDays, localToday, startOfLocalDay } from '../../shared/utils/company-time'
import type { RangeTable } from '../../shared/types/water'
import { PARAMETER_CATALOGUE, READING_KEYS, type ReadingKey } from '../../shared/utils/water/parameters'
import type { VisitType } from '../../shared/types/schedule'
import { doses, readings, visits, waterFeatures } from '../db/schema'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { counterOf, versionedCache } from '../utils/versioned-cache'
import { readerContext } from './company'
import { featureScope, getFeature } from './features'

/** Time windows of the trend charts. */
export const SERIES_RANGES = ['season', 'year', 'all'] as const
export type SeriesRange = (typeof SERIES_RANGES)[number]

/** Reading columns that can be charted, in the order the charts appear: the parameter catalogue's. */
export const CHART_PARAMETERS = READING_KEYS
export type ChartParameter = ReadingKey

/** Most points sent per parameter; longer histories are thinned evenly (first and last kept). */
export const MAX_POINTS = 5000
const MAX_MARKERS = 2000

export type SeriesPoint = [time: string, value: number]
/** One parameter's points, in the SI unit it is stored in (`unit`); the screens show them in the company's units. */
export interface ParameterSeries { key: ChartParameter, label: string, unit: string, points: SeriesPoint[] }
export interface FeatureSeries {
  featureId: string
  range: SeriesRange
  /** Start of the window (null for 'all') and the moment it was computed. */
  from: string | null
  to: string
  parameters: ParameterSeries[]
  ranges: RangeTable
  /** Finished visits at the feature's site: the local date, the type, and when it started. */
  visits: Array<{ date: string, type: VisitType, time: string }>
  doses: Array<{ time: string, productName: string, amount: number, unit: string }>
}

/**
 * Start of a window on the company-local date `day`: 'year' from the start of the day 365 days
 * before, 'season' from 1 March of the current season (company time), 'all' none. Whole days, so
 * an answer stays the same all day and can be kept until its inputs change.
 */
export function windowStart(range: SeriesRange, timeZone: string, day: string): Date | null {
  if (range === 'all') return null
  if (range === 'year') return startOfLocalDay(addDays(day, -365), timeZone)
  const [year, month] = day.split('-').map(Number) as [number, number]
  return startOfLocalDay(`${month >= 3 ? year : year - 1}-03-01`, timeZone)
}

/** At most `max` points, evenly spread over the list, keeping the first and the last. */
export function thin<T>(points: T[], max = MAX_POINTS): T[] {
  if (points.length <= max) return points
  const out: T[] = []
  const step = (points.length - 1) / (max - 1)
  for (let i = 0; i < max; i++) out.push(points[Math.round(i * step)]!)
  return out
}

type CachedSeries = Omit<FeatureSeries, 'to'>
/**
 * Built series kept per process under the feature's and its company's change counters: up to
 * 500 answers and 1,000,000 points and markers in all (RILLBOOK_SERIES_CACHE_POINTS).
 */
const seriesCache = versionedCache<CachedSeries>(500, {
  weigh: s => s.parameters.reduce((n, p) => n + p.points.length, 0) + s.visits.length + s.doses.length + 1,
  maxWeight: Number(process.env.RILLBOOK_SERIES_CACHE_POINTS || 1_000_000),
})

/**
 * A feature's readings as one time series per parameter, with its ranges, visits and doses, for
 * the trend charts. One indexed read checks the caller may see the feature (404 otherwise) and
 * reads its change counters; the series built for the same feature, window, day and parameters
 * under the same counters is answered as it is (versioned-cache), else it is built from one range
 * scan of `readings_feature_taken_idx` and visits from `visits_site_date_idx`.
 */
export async function featureSeries(
  actor: SessionUser, featureId: string,
  q: { range: SeriesRange, parameters?: ChartParameter[] },
  now: Date = new Date(),
): Promise<FeatureSeries> {
  // The company's time zone comes with the session (readerContext).
  const { timeZone } = await readerContext(actor)
  const [seen] = await useDb().select({ feature: counterOf('feature', 'water_features', 'id'), ranges: counterOf('ranges', 'water_features', 'company_id') })
    .from(waterFeatures).where(and(eq(waterFeatures.id, featureId), ...featureScope(actor))).limit(1)
  if (!seen) throw httpError(404, 'No such water feature')
  const day = localToday(timeZone, now)
  const keys: ChartParameter[] = q.parameters?.length ? CHART_PARAMETERS.filter(k => q.parameters!.includes(k)) : [...CHART_PARAMETERS]
  const explicit = Boolean(q.parameters?.length)
  const key = [actor.companyId, featureId, q.range, q.range === 'all' ? '' : day, timeZone, explicit ? keys.join(',') : '*'].join('|')
  const { featureId: id, range, from, ...rest } = await seriesCache.get(key, `${seen.feature}.${seen.ranges}`, () => buildSeries(actor, featureId, q.range, explicit ? keys : undefined, timeZone, day))
  return { featureId: id, range, from, to: now.toISOString(), ...rest }
}

/** The series of `featureSeries` built from the rows (no cache). */
async function buildSeries(actor: SessionUser, featureId: string, range: SeriesRange, parameters: ChartParameter[] | undefined, timeZone: string, day: string): Promise<CachedSeries> {
  const db = useDb()
  const from = windowStart(range, timeZone, day)
  const keys: ChartParameter[] = parameters ?? [...CHART_PARAMETERS]

  const readingWhere: SQL[] = [eq(readings.featureId, featureId), eq(readings.companyId, actor.companyId)]
  if (from) readingWhere.push(gte(readings.takenAt, from))
  const columns = Object.fromEntries(keys.map(k => [k, readings[k]])) as Record<ChartParameter, typeof readings.pH>

  const siteOfFeature = db.select({ id: waterFeatures.siteId }).from(waterFeatures).where(and(eq(waterFeatures.id, featureId), eq(waterFeatures.companyId, actor.companyId)))
  const visitWhere: SQL[] = [eq(visits.siteId, sql`(${siteOfFeature})`), eq(visits.companyId, actor.companyId), eq(visits.status, 'done')]
  if (from) visitWhere.push(gte(visits.scheduledOn, DateTime.fromJSDate(from, { zone: timeZone }).toISODate()!))
  const doseWhere: SQL[] = [eq(doses.featureId, featureId), eq(doses.companyId, actor.companyId)]
  if (from) doseWhere.push(gte(doses.dosedAt, from))

  // getFeature answers 404 outside the caller's reach; the lists are then never returned.
  const [feature, rows, visitRows, doseRows] = await Promise.all([
    getFeature(actor, featureId),
    db.select({ takenAt: readings.takenAt, ...columns }).from(readings).where(and(...readingWhere)).orderBy(asc(readings.takenAt)),
    db.select({ date: visits.scheduledOn, type: visits.visitType, startedAt: visits.startedAt, finishedAt: visits.finishedAt, startsAt: visits.startsAt })
      .from(visits).where(and(...visitWhere)).orderBy(asc(visits.scheduledOn)).limit(MAX_MARKERS),
    db.select({ time: doses.dosedAt, productName: doses.productName, amount: doses.amount, unit: doses.unit })
      .from(doses).where(and(...doseWhere)).orderBy(asc(doses.dosedAt)).limit(MAX_MARKERS),
  ])

  const series = new Map<ChartParameter, SeriesPoint[]>(keys.map(k => [k, []]))
  for (const row of rows) {
    const time = row.takenAt.toISOString()
    for (const k of keys) {
      const v = (row as Record<string, unknown>)[k]
      if (typeof v === 'number' && Number.isFinite(v)) series.get(k)!.push([time, v])
    }
  }
  // Without an explicit list, only parameters that were measured in the window.
  const shown = parameters ? keys : keys.filter(k => series.get(k)!.length > 0)

  return {
    featureId,
    range,
    from: from?.toISOString() ?? null,
    parameters: shown.map(k => ({ key: k, label: PARAMETER_CATALOGUE[k].label, unit: PARAMETER_CATALOGUE[k].siUnit, points: thin(series.get(k)!) })),
    ranges: feature.ranges,
    visits: visitRows.map(v => ({ date: v.date, type: v.type, time: (v.startedAt ?? v.finishedAt ?? v.startsAt).toISOString() })),
    doses: doseRows.map(d => ({ time: d.time.toISOString(), productName: d.productName, amount: d.amount, unit: d.unit })),
  }
}
