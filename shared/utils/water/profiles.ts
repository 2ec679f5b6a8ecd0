// Default range profiles per feature kind. Each bound names its source and says honestly whether it
// is a published value or the trade's common practice (CHECKS.md §7).
import type { BoundSource, FeatureKind, ParameterRange, RangeBound, RangeProfile, RangeTable } from '../../types/water'
import { FEATURE_KINDS, PARAMETERS } from '../../types/water'
import { WaterInputError } from './errors'

export type DefaultProfileKey = 'koi_pond' | 'water_garden' | 'pondless'

export const RANGE_SOURCES = {
  pH: 'Stone & Thomforde, Univ. of Arkansas at Pine Bluff extension',
  alkalinity: 'SRAC, Liming Ponds for Aquaculture; US EPA National Recommended Water Quality Criteria',
  ammonia: 'UF/IFAS FA16 (Francis-Floyd et al.), Ammonia in Aquatic Systems',
  chlorine: 'US EPA National Recommended Water Quality Criteria (total residual chlorine, chronic 0.011 mg/L; any detectable chlorine is treated as act)',
  salt: 'UF/IFAS VM 86 (Francis-Floyd), The Use of Salt in Aquaculture (0.5–1.0 % only as a bath for hours)',
  nitriteChloride: 'SRAC 462 (Durborow, Crosby & Brunson), Nitrite in Fish Ponds',
  commonPractice: 'common practice, no published source',
} as const

const pub = (source: string): BoundSource => ({ source, sourceKind: 'published' })
const cp = (note?: string): BoundSource => ({
  source: note ? `${RANGE_SOURCES.commonPractice} (${note})` : RANGE_SOURCES.commonPractice,
  sourceKind: 'common practice',
})

const BOUND_WORDS: Record<RangeBound, string> = {
  actBelow: 'act below',
  watchBelow: 'watch below',
  watchAbove: 'watch above',
  actAbove: 'act above',
  target: 'target',
}
const BOUND_ORDER: RangeBound[] = ['actBelow', 'watchBelow', 'watchAbove', 'actAbove', 'target']

/** Builds a range from bounds that each carry their own source. */
function range(bounds: Partial<Record<RangeBound, [number, BoundSource]>>): ParameterRange {
  const out: ParameterRange = { source: '', sourceKind: 'published', boundSources: {} }
  const bySource = new Map<string, string[]>()
  for (const b of BOUND_ORDER) {
    const entry = bounds[b]
    if (!entry) continue
    const [value, src] = entry
    out[b] = value
    out.boundSources![b] = src
    if (src.sourceKind !== 'published') out.sourceKind = 'common practice'
    bySource.set(src.source, [...(bySource.get(src.source) ?? []), BOUND_WORDS[b]])
  }
  out.source = bySource.size === 1
    ? [...bySource.keys()][0]!
    : [...bySource.entries()].map(([s, bs]) => `${s}: ${bs.join(', ')}`).join('; ')
  return out
}

/** Ranges shared by the two fish profiles. Total ammonia is mg/L as N; un-ionized ammonia as NH3. */
const FISH_COMMON: RangeTable = {
  nh3MgL: range({ watchAbove: [0.02, cp('chronic limit')], actAbove: [0.05, pub(RANGE_SOURCES.ammonia)] }),
  totalAmmoniaMgL: range({ watchAbove: [0.25, cp()], actAbove: [1.0, cp()], target: [0.1, cp()] }),
  nitriteMgL: range({ watchAbove: [0.1, cp('0 in an established pond')], actAbove: [0.25, cp()] }),
  nitrateMgL: range({ watchAbove: [20, cp()], actAbove: [50, cp()] }),
  dissolvedOxygenMgL: range({ actBelow: [5, cp()], watchBelow: [6, cp()] }),
  doSaturationPct: range({ watchBelow: [70, cp()] }),
  chlorineMgL: range({ actAbove: [0, pub(RANGE_SOURCES.chlorine)] }),
  temperatureC: range({ watchAbove: [27, cp('koi comfortable about 15–25 °C')], actAbove: [31, cp()] }),
  saltGL: range({ watchAbove: [3, cp('standing pond level 0.1–0.3 %')], actAbove: [5, pub(RANGE_SOURCES.salt)] }),
  phosphateMgL: range({ watchAbove: [0.5, cp()] }),
}

export const DEFAULT_PROFILES: Record<DefaultProfileKey, RangeProfile> = {
  koi_pond: {
    key: 'koi_pond',
    name: 'Koi pond',
    ranges: {
      ...FISH_COMMON,
      pH: range({
        actBelow: [6.5, pub(RANGE_SOURCES.pH)], watchBelow: [7.0, cp('koi ponds 7.0–8.5')],
        watchAbove: [8.5, cp('koi ponds 7.0–8.5')], actAbove: [9.5, pub(RANGE_SOURCES.pH)],
      }),
      khMgL: range({
        actBelow: [20, pub(RANGE_SOURCES.alkalinity)], watchBelow: [100, cp('koi ponds at least 100 mg/L')],
        target: [120, cp()],
      }),
    },
  },
  water_garden: {
    key: 'water_garden',
    name: 'Water garden',
    ranges: {
      ...FISH_COMMON,
      pH: range({
        actBelow: [6.5, pub(RANGE_SOURCES.pH)], watchBelow: [6.5, cp()],
        watchAbove: [9.0, cp()], actAbove: [9.5, pub(RANGE_SOURCES.pH)],
      }),
      khMgL: range({ actBelow: [20, pub(RANGE_SOURCES.alkalinity)], watchBelow: [50, cp()], target: [80, cp()] }),
    },
  },
  pondless: {
    key: 'pondless',
    name: 'Pondless feature (no fish)',
    ranges: {
      pH: range({
        actBelow: [6.0, cp('no fish')], watchBelow: [6.5, cp('no fish')],
        watchAbove: [9.0, cp('no fish')], actAbove: [9.5, cp('no fish')],
      }),
      khMgL: range({ actBelow: [20, pub(RANGE_SOURCES.alkalinity)] }),
      chlorineMgL: range({ watchAbove: [0, cp('no fish; after the US EPA total residual chlorine criterion')] }),
      saltGL: range({ watchAbove: [1, cp('plants')] }),
      phosphateMgL: range({ watchAbove: [0.5, cp()] }),
    },
  },
}

const KIND_TO_PROFILE: Record<FeatureKind, DefaultProfileKey> = {
  koi_pond: 'koi_pond',
  water_garden: 'water_garden',
  stream: 'water_garden',
  wetland_filter: 'water_garden',
  pondless_waterfall: 'pondless',
  fountain: 'pondless',
}

/** The default profile for a feature kind. */
export function profileKeyForKind(kind: FeatureKind): DefaultProfileKey {
  if (!(FEATURE_KINDS as readonly string[]).includes(kind)) {
    throw new WaterInputError('kind', `Unknown feature kind "${String(kind)}"`)
  }
  return KIND_TO_PROFILE[kind]
}

/**
 * Per-parameter shallow merge: each bound an override sets replaces the base's bound, the others
 * stay. Keys an override leaves undefined do not erase the base. A replaced bound takes the
 * override's source (its `boundSources` entry, else the override's own `source`/`sourceKind`).
 */
export function mergeRanges(base: RangeTable, overrides?: RangeTable | null): RangeTable {
  const out: RangeTable = {}
  for (const p of PARAMETERS) {
    const b = base[p]
    const o = overrides?.[p]
    if (!b && !o) continue
    if (!o) { out[p] = { ...b!, ...(b!.boundSources ? { boundSources: { ...b!.boundSources } } : {}) }; continue }
    const merged: ParameterRange = { ...(b ?? { source: o.source, sourceKind: o.sourceKind }) }
    const boundSources: Partial<Record<RangeBound, BoundSource>> = { ...(b?.boundSources ?? {}) }
    for (const bound of BOUND_ORDER) {
      const v = o[bound]
      if (v === undefined) continue
      merged[bound] = v
      const src = o.boundSources?.[bound] ?? (o.source !== undefined ? { source: o.source, sourceKind: o.sourceKind } : undefined)
      boundSources[bound] = src
    }
    if (o.source !== undefined) merged.source = o.source
    if (o.sourceKind !== undefined) merged.sourceKind = o.sourceKind
    const kept = Object.fromEntries(Object.entries(boundSources).filter(([, s]) => s !== undefined)) as Partial<Record<RangeBound, BoundSource>>
    if (Object.keys(kept).length > 0) merged.boundSources = kept
    else delete merged.boundSources
    // A range is "published" only while every bound with a source of its own is.
    if (Object.values(kept).some(s => s.sourceKind !== 'published')) merged.sourceKind = 'common practice'
    out[p] = merged
  }
  return out
}

/** The ranges for a feature: its kind's default profile, with the feature's own overrides. */
export function rangesForKind(kind: FeatureKind, overrides?: RangeTable | null): RangeTable {
  return mergeRanges(DEFAULT_PROFILES[profileKeyForKind(kind)].ranges, overrides)
}
