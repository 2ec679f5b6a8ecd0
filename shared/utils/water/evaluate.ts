// Status of one water test against a range table, with a plain-words reason per parameter.
import type {
  Parameter, ParameterEvaluation, ParameterRange, RangeTable, ReadingEvaluation, ReadingStatus, WaterReading,
} from '../../types/water'
import { PARAMETERS } from '../../types/water'
import { ammoniaToNitrogen, nitrogenToAmmonia, unionizedAmmoniaFraction } from './ammonia'
import { WaterInputError } from './errors'
import { oxygenSaturationMgL, STANDARD_PRESSURE_KPA } from './oxygen'
import { saltGLToChlorideMgL } from './units'
import { checkPH, checkPressureKPa, checkTempC, finite, nonNegative } from './validate'
import { formatQuantity, type UnitSystem } from './format'
import { formatParameter, PARAMETER_CATALOGUE } from './parameters'

/** Keep chloride at least 10 × nitrite (Durborow, Crosby & Brunson, SRAC 462, Nitrite in Fish Ponds). */
export const NITRITE_CHLORIDE_MIN_RATIO = 10

const STATUS_RANK: Record<ReadingStatus, number> = { ok: 0, watch: 1, act: 2 }

/** The worst of some statuses ('ok' for none). */
export function worstReadingStatus(statuses: Iterable<ReadingStatus>): ReadingStatus {
  let worst: ReadingStatus = 'ok'
  for (const s of statuses) if (STATUS_RANK[s] > STATUS_RANK[worst]) worst = s
  return worst
}

const CONCENTRATIONS = [
  'totalAmmoniaMgL', 'nitriteMgL', 'nitrateMgL', 'khMgL', 'ghMgL', 'dissolvedOxygenMgL', 'saltGL', 'chlorineMgL', 'phosphateMgL',
] as const

/** The present numbers of a reading. */
export type Measured = Partial<Record<keyof WaterReading, number>>

const present = (v: number | null | undefined): v is number => v !== null && v !== undefined

/** Checks every present value of a reading; returns the present numbers. Throws WaterInputError. */
export function validateWaterReading(reading: WaterReading): Measured {
  if (reading === null || typeof reading !== 'object') throw new WaterInputError('reading', 'reading is required')
  const out: Measured = {}
  if (present(reading.temperatureC)) out.temperatureC = checkTempC(reading.temperatureC, 'temperatureC')
  if (present(reading.pH)) out.pH = checkPH(reading.pH, 'pH')
  for (const f of CONCENTRATIONS) {
    const v = reading[f]
    if (present(v)) out[f] = nonNegative(v, f)
  }
  if (present(reading.waterLevelMm)) out.waterLevelMm = finite(reading.waterLevelMm, 'waterLevelMm')
  if (reading.ammoniaBasis !== undefined && reading.ammoniaBasis !== 'N' && reading.ammoniaBasis !== 'NH3') {
    throw new WaterInputError('ammoniaBasis', 'ammoniaBasis must be "N" or "NH3"')
  }
  return out
}

/** Total ammonia of a reading as N (converting from the NH3 basis when the kit reports that), or null. */
export function totalAmmoniaAsN(reading: WaterReading): number | null {
  const v = reading.totalAmmoniaMgL
  if (!present(v)) return null
  const tan = nonNegative(v, 'totalAmmoniaMgL')
  return reading.ammoniaBasis === 'NH3' ? ammoniaToNitrogen(tan) : tan
}

/** What every act-level reason ends with. */
export const ACT_TODAY = 'act today'
/** Words that belong to act-level advice only: a watch-level sentence never contains them. */
export const ACT_WORDS = /\b(?:today|now|immediately|urgent(?:ly)?|at once|call us)\b/i

interface Wording { low?: [watch: string, act: string], high?: [watch: string, act: string] }

const WORDS: Record<Parameter, Wording> = {
  temperatureC: {
    low: ['cold water — feed less', 'very cold — stop feeding and keep a hole in any ice'],
    high: ['warm water holds less oxygen — add aeration and shade', 'too warm for fish — aerate, shade and feed less'],
  },
  pH: {
    low: ['pH is drifting down — check KH', 'the water is turning acidic — check KH'],
    high: ['the water is quite alkaline — ammonia is more toxic as pH rises', 'the water is strongly alkaline — look for fresh mortar or concrete and heavy algae'],
  },
  totalAmmoniaMgL: {
    high: ['ammonia is building up — feed less and check the filter', 'ammonia is high — change some water and feed less'],
  },
  nh3MgL: {
    high: ['stressful to fish over time — feed less and check the filter', 'harmful to fish'],
  },
  nitriteMgL: {
    high: ['the filter is not keeping up — feed less and retest', 'harmful to fish — change some water'],
  },
  nitrateMgL: {
    high: ['feeds algae — plan a partial water change', 'high — change some water and review feeding and stocking'],
  },
  khMgL: {
    low: ['the buffer is getting low — pH may swing', 'the water has almost no buffer — pH can crash'],
  },
  ghMgL: {},
  dissolvedOxygenMgL: {
    low: ['oxygen is getting low — add aeration', 'fish may struggle for oxygen — aerate day and night'],
  },
  doSaturationPct: {
    low: ['the water holds less oxygen than it could — add aeration or water movement', 'very little oxygen for this temperature — aerate day and night'],
  },
  saltGL: {
    high: ['more salt than a standing pond level — hard on plants', 'as strong as a short treatment bath — too much to leave in the pond; change some water'],
  },
  chlorineMgL: {
    high: ['chlorine from tap water — add dechlorinator', 'chlorine is toxic to fish — add dechlorinator for the whole pond'],
  },
  phosphateMgL: {
    high: ['feeds algae — check feeding and plant cover', 'strongly feeds algae — check feeding, plant cover and fertiliser run-off'],
  },
}

/** A value of `parameter` with its unit, in the system's units. */
const withUnit = (parameter: Parameter, v: number, system: UnitSystem) => formatParameter(parameter, v, system)
/** The same, without the unit (a limit after a value that carries it). */
const bare = (parameter: Parameter, v: number, system: UnitSystem) => formatParameter(parameter, v, system, { bare: true })

/** Classifies one value against one range (strict comparisons, act before watch). */
export function classifyParameterValue(parameter: Parameter, value: number, range: ParameterRange, system: UnitSystem = 'metric'): ParameterEvaluation {
  const w = WORDS[parameter]
  const label = PARAMETER_CATALOGUE[parameter].label
  const head = `${label} ${withUnit(parameter, value, system)}`
  const crossed = (status: ReadingStatus, limit: number, dir: 'low' | 'high'): ParameterEvaluation => {
    const words = w[dir]?.[status === 'act' ? 1 : 0] ?? `${dir === 'low' ? 'below' : 'above'} the range set for this feature`
    // Act-level reasons say so; watch-level reasons never use act words (see ACT_WORDS).
    const text = status === 'act' ? `${words} — ${ACT_TODAY}` : words
    return { parameter, value, status, limit, reason: `${head} is ${dir === 'low' ? 'below' : 'above'} ${bare(parameter, limit, system)}: ${text}` }
  }
  if (range.actBelow !== undefined && value < range.actBelow) return crossed('act', range.actBelow, 'low')
  if (range.actAbove !== undefined && value > range.actAbove) return crossed('act', range.actAbove, 'high')
  if (range.watchBelow !== undefined && value < range.watchBelow) return crossed('watch', range.watchBelow, 'low')
  if (range.watchAbove !== undefined && value > range.watchAbove) return crossed('watch', range.watchAbove, 'high')
  const lo = range.watchBelow ?? range.actBelow
  const hi = range.watchAbove ?? range.actAbove
  let reason: string
  if (lo !== undefined && hi !== undefined) reason = `${head} is within ${bare(parameter, lo, system)}–${bare(parameter, hi, system)}`
  else if (hi === 0 && value === 0) reason = `${label}: none detected`
  else if (hi !== undefined) reason = `${head} is at or below ${bare(parameter, hi, system)}`
  else if (lo !== undefined) reason = `${head} is at or above ${bare(parameter, lo, system)}`
  else reason = `${head}: no limits set`
  return { parameter, value, status: 'ok', limit: null, reason }
}

/**
 * Evaluates one water test. Converts total ammonia to the N basis, computes un-ionized ammonia
 * (when TAN, pH and temperature are present; nh3MgL limits are compared on the NH3 basis) and
 * oxygen saturation (when DO and temperature are present), then rates every measured or computed
 * parameter that has a range. Also applies the nitrite:chloride rule of SRAC 462 when salt is known.
 */
export function evaluateReading(reading: WaterReading, ranges: RangeTable, context?: { pressureKPa?: number, unitSystem?: UnitSystem }): ReadingEvaluation {
  const system = context?.unitSystem ?? 'metric'
  const m = validateWaterReading(reading)
  const pressureKPa = context?.pressureKPa === undefined ? STANDARD_PRESSURE_KPA : checkPressureKPa(context.pressureKPa)
  const tanN = totalAmmoniaAsN(reading)

  const computed: ReadingEvaluation['computed'] = {
    nh3MgL: null, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: null,
  }
  if (tanN !== null && m.pH !== undefined && m.temperatureC !== undefined) {
    computed.nh3Fraction = unionizedAmmoniaFraction(m.pH, m.temperatureC)
    computed.nh3AsNMgL = tanN * computed.nh3Fraction
    computed.nh3MgL = nitrogenToAmmonia(computed.nh3AsNMgL)
  }
  if (m.dissolvedOxygenMgL !== undefined && m.temperatureC !== undefined) {
    computed.doSaturationMgL = oxygenSaturationMgL(m.temperatureC, pressureKPa)
    computed.doSaturationPct = (100 * m.dissolvedOxygenMgL) / computed.doSaturationMgL
  }

  const values: Partial<Record<Parameter, number>> = {
    temperatureC: m.temperatureC,
    pH: m.pH,
    totalAmmoniaMgL: tanN ?? undefined,
    nh3MgL: computed.nh3MgL ?? undefined,
    nitriteMgL: m.nitriteMgL,
    nitrateMgL: m.nitrateMgL,
    khMgL: m.khMgL,
    ghMgL: m.ghMgL,
    dissolvedOxygenMgL: m.dissolvedOxygenMgL,
    doSaturationPct: computed.doSaturationPct ?? undefined,
    saltGL: m.saltGL,
    chlorineMgL: m.chlorineMgL,
    phosphateMgL: m.phosphateMgL,
  }

  const parameters: ParameterEvaluation[] = []
  for (const p of PARAMETERS) {
    const v = values[p]
    const r = ranges?.[p]
    if (v === undefined) continue
    if (r) parameters.push(classifyParameterValue(p, v, r, system))
  }

  // Nitrite:chloride (SRAC 462). Nitrite is taken as reported (mg/L NO2-); chloride comes from the salt reading.
  const nitrite = m.nitriteMgL
  if (nitrite !== undefined && nitrite > 0 && m.saltGL !== undefined) {
    const chloride = saltGLToChlorideMgL(m.saltGL)
    if (chloride < NITRITE_CHLORIDE_MIN_RATIO * nitrite) {
      const note = `chloride ${formatQuantity('concentration', chloride, system, { digits: 0 })} is below 10 × nitrite, so nitrite is more toxic to fish — add pond salt or change some water (SRAC 462)`
      const i = parameters.findIndex(e => e.parameter === 'nitriteMgL')
      const existing = i >= 0 ? parameters[i]! : undefined
      if (existing && existing.status !== 'ok') {
        parameters[i] = { ...existing, reason: `${existing.reason}; ${note}` }
      } else {
        const entry: ParameterEvaluation = {
          parameter: 'nitriteMgL', value: nitrite, status: 'watch', limit: chloride / NITRITE_CHLORIDE_MIN_RATIO,
          reason: `Nitrite ${withUnit('nitriteMgL', nitrite, system)} with ${note}`,
        }
        if (existing) parameters[i] = entry
        else parameters.splice(parameters.filter(e => PARAMETERS.indexOf(e.parameter) < PARAMETERS.indexOf('nitriteMgL')).length, 0, entry)
      }
    }
  }

  return { computed, parameters, overall: worstReadingStatus(parameters.map(e => e.status)) }
}
