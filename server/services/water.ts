import { WATER_ADVICE_SAFETY, safetySentence } from '../../shared/utils/safety'
import type { EvaluateRequest } from '../../shared/schemas/water'
import {
  DEFAULT_PROFILES, dosingSuggestions, mergeRanges, profileKeyForKind, WaterInputError, type DosingSuggestionsInput,
} from '../../shared/utils/water-chemistry'
import type { UnitSystem } from '../../shared/utils/water/format'
import type { SessionUser } from '../utils/auth'
import { readerContext } from './company'
import { getFeature } from './features'
import { evaluateAtSite, readingInputError } from './readings'

/**
 * Evaluates a reading for a feature (its volume, ranges and site altitude) or for a given volume
 * (the kind's default ranges, optionally overridden), through the one readings service. Returns
 * the computed values, statuses and dosing suggestions, in the caller's units, together with the
 * inputs they came from.
 */
export async function evaluateWater(actor: SessionUser, req: EvaluateRequest) {
  const { unitSystem } = await readerContext(actor)
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
  const { pressureKPa, ...evaluation } = evaluateAtSite(req.reading, { ranges, altitudeM, unitSystem, fieldPrefix: 'reading.' })
  try {
    const suggestions = dosingSuggestions(dosingInput({
      reading: req.reading, volumeL: volumeL!, ranges, topUpLitres: req.topUpLitres, dechlorinatorRate: req.dechlorinatorRate ?? null, fish,
    }, unitSystem))
    return {
      feature,
      inputs: { volumeL, altitudeM, pressureKPa, topUpLitres: req.topUpLitres ?? 0 },
      unitSystem,
      ...evaluation,
      suggestions,
      cautions: WATER_CAUTIONS,
    }
  }
  catch (err) {
    if (err instanceof WaterInputError) throw readingInputError(err, 'reading.')
    throw err
  }
}

/**
 * The dosing engine's input in the reader's units: the engine writes its amounts and reasons in
 * `unitSystem` (an engine that does not know the option yet ignores it).
 */
function dosingInput(input: DosingSuggestionsInput, unitSystem: UnitSystem): DosingSuggestionsInput {
  const withUnits = { ...input, unitSystem }
  return withUnits
}

/** Under every water check (the one list of cautions: shared/utils/safety.ts). */
export const WATER_CAUTIONS = WATER_ADVICE_SAFETY.map(safetySentence)
