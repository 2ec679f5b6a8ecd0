import type { EvaluateRequest } from '../../shared/schemas/water'
import {
  DEFAULT_PROFILES, dosingSuggestions, evaluateReading, mergeRanges, pressureAtAltitudeKPa, profileKeyForKind, WaterInputError,
} from '../../shared/utils/water-chemistry'
import type { SessionUser } from '../utils/auth'
import { httpError } from '../utils/errors'
import { getFeature } from './features'

/**
 * Evaluates a reading for a feature (its volume, ranges and site altitude) or for a given volume
 * (the kind's default ranges, optionally overridden). Returns the computed values, statuses and
 * dosing suggestions together with the inputs they came from.
 */
export async function evaluateWater(actor: SessionUser, req: EvaluateRequest) {
  let volumeL = req.volumeL
  let ranges = req.ranges ? mergeRanges(DEFAULT_PROFILES[profileKeyForKind(req.kind ?? 'koi_pond')].ranges, req.ranges) : DEFAULT_PROFILES[profileKeyForKind(req.kind ?? 'koi_pond')].ranges
  let altitudeM = req.altitudeM ?? null
  let fish = (req.kind ?? 'koi_pond') !== 'pondless_waterfall' && req.kind !== 'fountain'
  let feature: { id: string, name: string, kind: string } | null = null
  if (req.featureId) {
    const f = await getFeature(actor, req.featureId)
    feature = { id: f.id, name: f.name, kind: f.kind }
    volumeL ??= f.volumeL
    ranges = req.ranges ? mergeRanges(f.ranges, req.ranges) : f.ranges
    altitudeM = req.altitudeM ?? f.site.altitudeM ?? null
    fish = f.fish.some(s => s.count > 0)
  }
  try {
    const pressureKPa = altitudeM == null ? 101.325 : pressureAtAltitudeKPa(altitudeM)
    const evaluation = evaluateReading(req.reading, ranges, { pressureKPa })
    const suggestions = dosingSuggestions({
      reading: req.reading, volumeL: volumeL!, ranges, topUpLitres: req.topUpLitres, dechlorinatorRate: req.dechlorinatorRate ?? null, fish,
    })
    return {
      feature,
      inputs: { volumeL, altitudeM, pressureKPa, topUpLitres: req.topUpLitres ?? 0 },
      ...evaluation,
      suggestions,
      cautions: WATER_CAUTIONS,
    }
  }
  catch (err) {
    if (err instanceof WaterInputError) {
      const field = ['volumeL', 'topUpLitres', 'altitudeM'].includes(err.field) ? err.field : `reading.${err.field}`
      throw httpError(400, `Invalid body: ${field} — ${err.message}`, { fields: { [field]: err.message } })
    }
    throw err
  }
}

export const WATER_CAUTIONS = [
  'Dosing figures are advice computed from the readings and volume shown; read and follow each product\'s label first.',
  'Keep chemicals away from children and pets.',
  'Salt and medications can harm plants and some fish.',
  'Pumps, lights and heaters belong on a ground-fault (GFCI/RCD) protected circuit installed to local code by a licensed electrician.',
]
