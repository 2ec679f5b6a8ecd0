// Types of the water-chemistry engine. Everything is in SI (or SI-derived lab) units:
// metres, litres, °C, kPa, mg/L. KH and GH are mg/L as CaCO3; salt is g/L (= ppt, w/v).

export const FEATURE_KINDS = ['koi_pond', 'water_garden', 'pondless_waterfall', 'stream', 'fountain', 'wetland_filter'] as const
export type FeatureKind = (typeof FEATURE_KINDS)[number]

/** Outline and depth of a feature. Irregular outlines use average length, width and depth. */
export type FeatureShape =
  | { kind: 'rectangle', lengthM: number, widthM: number, depthM: number, shelf?: Shelf }
  | { kind: 'circle', diameterM: number, depthM: number, shelf?: Shelf }
  | { kind: 'oval', lengthM: number, widthM: number, depthM: number, shelf?: Shelf }
  | { kind: 'irregular', lengthM: number, widthM: number, avgDepthM: number, shelf?: Shelf }

/** A plant shelf: a shallower band of `widthM` along `lengthM` of the edge, `depthM` below the water line. */
export interface Shelf { lengthM: number, widthM: number, depthM: number }

/** Basis a test kit reports total ammonia in: as nitrogen (NH3-N) or as NH3. */
export type AmmoniaBasis = 'N' | 'NH3'

/** One water test, SI units; every value optional (kits differ). */
export interface WaterReading {
  temperatureC?: number | null
  pH?: number | null
  /** Total ammonia (NH3 + NH4+), in the basis given by `ammoniaBasis` (default 'N'). */
  totalAmmoniaMgL?: number | null
  ammoniaBasis?: AmmoniaBasis
  /** Nitrite, mg/L as NO2-. */
  nitriteMgL?: number | null
  /** Nitrate, mg/L as NO3-. */
  nitrateMgL?: number | null
  /** Carbonate hardness, mg/L as CaCO3. */
  khMgL?: number | null
  /** General hardness, mg/L as CaCO3. */
  ghMgL?: number | null
  dissolvedOxygenMgL?: number | null
  /** Salt, g/L (ppt, w/v). */
  saltGL?: number | null
  /** Total chlorine / chloramine, mg/L as Cl2. */
  chlorineMgL?: number | null
  /** Phosphate, mg/L as PO4. */
  phosphateMgL?: number | null
  /** Water level, mm relative to a fixed mark (higher = fuller). */
  waterLevelMm?: number | null
}

/** Parameters a range profile can hold; `nh3` and `doSaturation` are computed. */
export const PARAMETERS = [
  'temperatureC', 'pH', 'totalAmmoniaMgL', 'nh3MgL', 'nitriteMgL', 'nitrateMgL', 'khMgL', 'ghMgL',
  'dissolvedOxygenMgL', 'doSaturationPct', 'saltGL', 'chlorineMgL', 'phosphateMgL',
] as const
export type Parameter = (typeof PARAMETERS)[number]

export type SourceKind = 'published' | 'common practice'

/**
 * Limits for one parameter. A value strictly below `actBelow` or above `actAbove` is `act`;
 * else strictly below `watchBelow` or above `watchAbove` is `watch`; otherwise `ok`.
 * `target` is what dosing aims for (e.g. KH). Each bound states where it comes from.
 */
export interface ParameterRange {
  actBelow?: number
  watchBelow?: number
  watchAbove?: number
  actAbove?: number
  target?: number
  source: string
  sourceKind: SourceKind
  /** Optional: the source of individual bounds when they differ (e.g. act published, watch common practice). */
  boundSources?: RangeBoundSources
}

export type RangeTable = Partial<Record<Parameter, ParameterRange>>

export interface RangeProfile {
  key: string
  name: string
  ranges: RangeTable
}

export type ReadingStatus = 'ok' | 'watch' | 'act'

export interface ParameterEvaluation {
  parameter: Parameter
  value: number
  status: ReadingStatus
  /** The bound that was crossed, when not ok. */
  limit: number | null
  /** One line in plain words, e.g. "pH 6.2 is below 6.5: the water is turning acidic". */
  reason: string
}

export interface ReadingEvaluation {
  /** Computed values: un-ionized ammonia (mg/L as NH3 and as N), DO saturation (mg/L) and percent. */
  computed: {
    nh3MgL: number | null
    nh3AsNMgL: number | null
    nh3Fraction: number | null
    doSaturationMgL: number | null
    doSaturationPct: number | null
  }
  parameters: ParameterEvaluation[]
  /** Worst status over all parameters ('ok' when nothing was measured). */
  overall: ReadingStatus
}

/** A product's label rate: `amount` of `unit` per `perLitres` of pond water. */
export interface LabelRate { amount: number, unit: string, perLitres: number }

/** The bounds of a `ParameterRange` that can carry their own source. */
export type RangeBound = 'actBelow' | 'watchBelow' | 'watchAbove' | 'actAbove' | 'target'

/** Where one bound comes from, when the bounds of one parameter have different sources. */
export interface BoundSource { source: string, sourceKind: SourceKind }

/** Per-bound sources of a range (optional; the range's own `source` covers the rest). */
export type RangeBoundSources = Partial<Record<RangeBound, BoundSource>>

export type DosingSuggestionKey =
  | 'aeration' | 'feeding' | 'kh_buffer' | 'kh_after_ammonia' | 'water_change_ammonia' | 'water_change_nitrite'
  | 'salt_for_nitrite' | 'dechlorinator'

/** First things first: 1 oxygen, 2 ammonia and nitrite, 3 pH stability, 4 KH, 5 looks and the rest. */
export type AdvicePriority = 1 | 2 | 3 | 4 | 5

/** One piece of dosing advice, shown with the inputs it was computed from. */
export interface DosingSuggestion {
  key: DosingSuggestionKey
  /** Plain name of what to add, e.g. 'sodium bicarbonate (KH buffer)'; never a brand. */
  product: string
  /** How much, in SI (`unit`); null for advice without an amount (aeration, feeding) or when it cannot be computed. */
  amount: number | null
  /** 'g', 'kg', 'L', or the label rate's unit ('' without an amount). */
  unit: string
  /** The amount in the company's units, rounded to what a person can measure out ("2.7 lb", "7,800 L"); null without an amount. */
  amountText: string | null
  /** 1 oxygen, 2 ammonia and nitrite, 3 pH stability, 4 KH, 5 looks and the rest; suggestions come sorted by it. */
  priority: AdvicePriority
  /** For water changes: the fraction (0..1) of the volume to replace in the first step. */
  fraction?: number
  /** Why, in plain words, in the company's units. */
  reason: string
  /** What the amount was computed from (volumeL, fromDKH, toDKH, …), in SI. */
  inputs: Record<string, number | string>
  cautions: string[]
}
