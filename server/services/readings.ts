// The one home of a water reading on the server: evaluated at the site's air pressure in the
// reader's units, input errors mapped to the form's fields, and saved (upserted by the client's
// id) the same way whether a technician, a customer or the demo seed wrote it.
import { eq, type SQL } from 'drizzle-orm'
import type { RangeTable, ReadingEvaluation, WaterReading } from '../../shared/types/water'
import type { UnitSystem } from '../../shared/utils/water/format'
import { PARAMETER_CATALOGUE, type ReadingKey } from '../../shared/utils/water/parameters'
import { evaluateReading, pressureAtAltitudeKPa, STANDARD_PRESSURE_KPA, WaterInputError } from '../../shared/utils/water-chemistry'
import { readings } from '../db/schema'
import type { Tx } from '../utils/db'
import { httpError } from '../utils/errors'

type ReadingRow = typeof readings.$inferInsert

/** Station air pressure at a site: from its altitude, else the standard atmosphere at sea level. */
export function sitePressureKPa(altitudeM: number | null | undefined): number {
  return altitudeM == null ? STANDARD_PRESSURE_KPA : pressureAtAltitudeKPa(altitudeM)
}

export interface ReadingContext {
  ranges: RangeTable
  /** The site's altitude (null: sea level). */
  altitudeM: number | null | undefined
  /** The units the reasons are written in. */
  unitSystem: UnitSystem
  /** Prefix of the field paths in the request body, e.g. `readings.0.` or `reading.`. */
  fieldPrefix?: string
}

/** The form's name for a field an engine error names (a catalogue key or an argument). */
function fieldLabel(field: string) {
  return PARAMETER_CATALOGUE[field as ReadingKey]?.label ?? field
}

/** An engine input error as the one 400 shape, naming the field as the form labels it. */
export function readingInputError(err: WaterInputError, fieldPrefix = '') {
  // Only a value of the reading sits under the prefix; the site's altitude or a volume does not.
  const ofReading = err.field in PARAMETER_CATALOGUE || err.field === 'ammoniaBasis'
  const path = `${ofReading ? fieldPrefix : ''}${err.field}`
  return httpError(400, `Invalid body: ${fieldLabel(err.field)} — ${err.message}`, { fields: { [path]: err.message } })
}

/** The reading evaluated against the feature's ranges at the site's pressure; a 400 naming the field when a value cannot be used. */
export function evaluateAtSite(reading: WaterReading, ctx: ReadingContext): ReadingEvaluation & { pressureKPa: number } {
  try {
    const pressureKPa = sitePressureKPa(ctx.altitudeM)
    return { ...evaluateReading(reading, ctx.ranges, { pressureKPa, unitSystem: ctx.unitSystem }), pressureKPa }
  }
  catch (err) {
    if (err instanceof WaterInputError) throw readingInputError(err, ctx.fieldPrefix)
    throw err
  }
}

/** The measured values of a reading input (everything but the ids, the time and who wrote it). */
export function measuredValues<T extends WaterReading & { id: string, featureId: string, takenAt: string }>(input: T): WaterReading {
  const { id: _i, featureId: _f, takenAt: _t, ...values } = input
  return values
}

export interface ReadingMeta {
  id: string
  companyId: string
  featureId: string
  visitId: string | null
  takenAt: Date
  enteredBy: string | null
  source: 'technician' | 'customer'
}

/** The row to store: the measured values, who and when, and what the evaluation computed. */
export function readingRow(meta: ReadingMeta, values: WaterReading, evaluation: ReadingEvaluation): ReadingRow {
  return {
    ...values, ...meta,
    nh3MgL: evaluation.computed.nh3MgL, doSaturationPct: evaluation.computed.doSaturationPct, overall: evaluation.overall, evaluation: evaluation.parameters,
  }
}

/**
 * Saves a reading by its client-made id: a resubmission updates the same row. With `onlyWhere`,
 * an existing row is only updated when it matches (e.g. it belongs to this visit); otherwise
 * nothing is written and the result is false.
 */
export async function upsertReading(tx: Tx, row: ReadingRow, onlyWhere?: SQL): Promise<boolean> {
  const { id, ...set } = row
  const [kept] = await tx.insert(readings).values(row).onConflictDoUpdate({ target: readings.id, set, ...(onlyWhere && { setWhere: onlyWhere }) }).returning({ id: readings.id })
  return !!kept
}

/** Many readings at once (the demo seed): rows that exist already are kept as they are. */
export async function insertReadingsOnce(tx: Tx, rows: ReadingRow[]): Promise<number> {
  let added = 0
  for (let i = 0; i < rows.length; i += 500) {
    added += (await tx.insert(readings).values(rows.slice(i, i + 500)).onConflictDoNothing().returning({ id: readings.id })).length
  }
  return added
}

/** A reading of this visit (for `upsertReading`'s `onlyWhere`). */
export const ofVisit = (visitId: string) => eq(readings.visitId, visitId)
