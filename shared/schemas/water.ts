import { z } from 'zod'
import type { UnitSystem } from '../utils/water/format'
import { formatQuantity } from '../utils/water/format'
import { formatParameter, PARAMETER_CATALOGUE, type ReadingKey } from '../utils/water/parameters'
import { rangeTableSchema } from './features'
import { text } from './fields'

// Values arrive in SI; messages speak as the form labels the field (the catalogue's label) and
// quote limits in the units the person typed, e.g. "Water temperature above 113 °F is not
// plausible for a pond". Each schema comes per unit system; the plain export is metric.

const label = (key: ReadingKey) => PARAMETER_CATALOGUE[key].label
const limit = (key: ReadingKey, v: number, system: UnitSystem) => formatParameter(key, v, system)

/** A measured concentration between 0 and a plausible maximum. */
function conc(key: ReadingKey, max: number, system: UnitSystem) {
  const what = label(key)
  return z.number(`${what} is a number`).min(0, `${what} cannot be negative`).max(max, `${what} above ${limit(key, max, system)} is not plausible`).nullish()
}

function readingShape(system: UnitSystem) {
  const t = label('temperatureC')
  return {
    temperatureC: z.number(`${t} is a number`)
      .min(0, `${t} below ${limit('temperatureC', 0, system)} is ice`)
      .max(45, `${t} above ${limit('temperatureC', 45, system)} is not plausible for a pond`).nullish(),
    pH: z.number('pH is a number').min(0, 'pH is between 0 and 14').max(14, 'pH is between 0 and 14').nullish(),
    totalAmmoniaMgL: conc('totalAmmoniaMgL', 100, system),
    ammoniaBasis: z.enum(['N', 'NH3'], 'Choose whether the kit reports ammonia as N or as NH3').default('N'),
    nitriteMgL: conc('nitriteMgL', 100, system),
    nitrateMgL: conc('nitrateMgL', 1000, system),
    khMgL: conc('khMgL', 1000, system),
    ghMgL: conc('ghMgL', 2000, system),
    dissolvedOxygenMgL: conc('dissolvedOxygenMgL', 30, system),
    saltGL: conc('saltGL', 40, system),
    chlorineMgL: conc('chlorineMgL', 20, system),
    phosphateMgL: conc('phosphateMgL', 50, system),
    waterLevelMm: z.number(`${label('waterLevelMm')} is a number`)
      .min(-5000, `${label('waterLevelMm')} is at most ${limit('waterLevelMm', 5000, system)} below the mark`)
      .max(5000, `${label('waterLevelMm')} is at most ${limit('waterLevelMm', 5000, system)} above the mark`).nullish(),
  }
}

/** Builds a schema once per unit system. */
export function perUnitSystem<T>(build: (system: UnitSystem) => T): (system: UnitSystem) => T {
  const cache = new Map<UnitSystem, T>()
  return (system) => {
    if (!cache.has(system)) cache.set(system, build(system))
    return cache.get(system)!
  }
}

/** One water test in SI units (mg/L; KH and GH as CaCO3; salt g/L; temperature °C), messages in `system`'s units. */
export const waterReadingSchemaFor = perUnitSystem(system => z.object(readingShape(system)))
export const waterReadingSchema = waterReadingSchemaFor('metric')
export type WaterReadingInput = z.output<typeof waterReadingSchema>

const labelRateSchema = z.object({
  amount: z.number().positive('Label amount must be more than 0').max(100_000),
  unit: text(20, 'Give the unit'),
  perLitres: z.number().positive('Label volume must be more than 0').max(10_000_000),
})

/** POST /api/water/evaluate: a reading plus either a feature id or a volume (and optional ranges). */
export const evaluateRequestSchemaFor = perUnitSystem((system) => {
  const altitude = `Altitude is between ${formatQuantity('altitude', -500, system)} and ${formatQuantity('altitude', 6000, system)}`
  return z.object({
    reading: waterReadingSchemaFor(system),
    featureId: z.uuid('Not a valid feature id').optional(),
    volumeL: z.number('Volume is a number').positive('Volume must be more than 0').max(5_000_000, `Volume above ${formatQuantity('volume', 5_000_000, system)} is not plausible`).optional(),
    kind: z.enum(['koi_pond', 'water_garden', 'pondless_waterfall', 'stream', 'fountain', 'wetland_filter']).optional(),
    ranges: rangeTableSchema.optional(),
    topUpLitres: z.number('Top-up is a number').min(0, 'Top-up cannot be negative').max(1_000_000, `Top-up above ${formatQuantity('volume', 1_000_000, system)} is not plausible`).optional(),
    dechlorinatorRate: labelRateSchema.nullish(),
    altitudeM: z.number().min(-500, altitude).max(6000, altitude).optional(),
  }).refine(r => r.featureId || r.volumeL, { path: ['volumeL'], message: 'Give a featureId or a volumeL' })
})
export const evaluateRequestSchema = evaluateRequestSchemaFor('metric')
export type EvaluateRequest = z.output<typeof evaluateRequestSchema>
