import { and, asc, count, desc, eq, gte, lte, type SQL } from 'drizzle-orm'
import { doses, photos, readings, visits } from '../db/schema'
import type { UnitSystem } from '../../shared/utils/water/format'
import { PARAMETER_LIST, parameterDigits, parameterHeading, parameterToDisplay } from '../../shared/utils/water/parameters'
import type { SessionUser } from '../utils/auth'
import { useDb } from '../utils/db'
import { getFeature } from './features'

export const READING_SORTS = ['takenAt', 'pH', 'temperatureC', 'totalAmmoniaMgL', 'nh3MgL', 'nitriteMgL', 'khMgL', 'dissolvedOxygenMgL'] as const
type ReadingRecord = typeof readings.$inferSelect
interface CsvColumn { heading: string, value: (r: ReadingRecord) => unknown }

/**
 * The columns of a readings CSV in `system`'s units: the catalogue's parameters, each headed by its
 * label and unit ("Water temperature (°F)") and rounded one digit finer than on screen.
 */
export function readingCsvColumns(system: UnitSystem): CsvColumn[] {
  const parameters = PARAMETER_LIST.flatMap((p): CsvColumn[] => {
    const col: CsvColumn = {
      heading: parameterHeading(p.key, system),
      value: (r) => {
        const v = r[p.key]
        return v == null ? null : Number(parameterToDisplay(p.key, v, system).toFixed(parameterDigits(p.key, system) + 1))
      },
    }
    return p.key === 'totalAmmoniaMgL' ? [col, { heading: 'Ammonia kit reports as', value: r => r.ammoniaBasis }] : [col]
  })
  return [
    { heading: 'Taken at', value: r => r.takenAt },
    { heading: 'Entered by', value: r => r.source },
    ...parameters,
    { heading: 'Status', value: r => r.overall },
  ]
}

/** A feature's readings as CSV in the reader's units. */
export function readingsCsv(rows: ReadingRecord[], system: UnitSystem) {
  const columns = readingCsvColumns(system)
  return toCsv(columns.map(c => c.heading), rows.map(r => Object.fromEntries(columns.map(c => [c.heading, c.value(r)]))))
}

/** A feature's readings (paged and sorted, or all in a date range for CSV); tenancy through getFeature. */
export async function featureReadings(actor: SessionUser, featureId: string, q: { page: number, pageSize: number, sort: (typeof READING_SORTS)[number], dir: 'asc' | 'desc', from?: string, to?: string }, all = false) {
  await getFeature(actor, featureId)
  const db = useDb()
  const where: SQL[] = [eq(readings.featureId, featureId)]
  if (q.from) where.push(gte(readings.takenAt, new Date(q.from)))
  if (q.to) where.push(lte(readings.takenAt, new Date(`${q.to}T23:59:59Z`)))
  const col = readings[q.sort]
  const cond = and(...where)
  const base = db.select().from(readings).where(cond).orderBy(q.dir === 'desc' ? desc(col) : asc(col), asc(readings.id))
  if (all) return { rows: await base.limit(10_000), total: 0, page: 1, pageSize: 10_000 }
  const [rows, [total]] = await Promise.all([
    base.limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(readings).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

/** A feature's visits with their doses and photos, newest first. */
export async function featureVisits(actor: SessionUser, featureId: string, q: { page: number, pageSize: number }) {
  const feature = await getFeature(actor, featureId)
  const db = useDb()
  const cond = and(eq(visits.siteId, feature.siteId), eq(visits.companyId, actor.companyId))
  const [rows, [total]] = await Promise.all([
    db.select({ id: visits.id, scheduledOn: visits.scheduledOn, visitType: visits.visitType, status: visits.status, finishedAt: visits.finishedAt, customerNotes: visits.customerNotes })
      .from(visits).where(cond).orderBy(desc(visits.scheduledOn)).limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(visits).where(cond),
  ])
  const ids = rows.map(r => r.id)
  const [doseRows, photoRows] = ids.length
    ? await Promise.all([
        db.select().from(doses).where(eq(doses.featureId, featureId)).orderBy(desc(doses.dosedAt)).limit(500),
        db.select({ id: photos.id, visitId: photos.visitId, caption: photos.caption }).from(photos).where(eq(photos.featureId, featureId)).limit(500),
      ])
    : [[], []]
  return {
    rows: rows.map(r => ({ ...r, doses: doseRows.filter(d => d.visitId === r.id), photos: photoRows.filter(p => p.visitId === r.id) })),
    total: total?.n ?? 0, page: q.page, pageSize: q.pageSize,
  }
}

/** RFC 4180 CSV. */
export function toCsv(columns: readonly string[], rows: Array<Record<string, unknown>>) {
  const cell = (v: unknown) => {
    if (v == null) return ''
    const s = v instanceof Date ? v.toISOString() : String(v)
    return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
  }
  return [columns.join(','), ...rows.map(r => columns.map(c => cell(r[c])).join(','))].join('\r\n') + '\r\n'
}
