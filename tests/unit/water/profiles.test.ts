import { describe, expect, it } from 'vitest'
import type { ParameterRange, RangeBound } from '../../../shared/types/water'
import { FEATURE_KINDS, PARAMETERS } from '../../../shared/types/water'
import { DEFAULT_PROFILES, mergeRanges, profileKeyForKind, rangesForKind, WaterInputError } from '../../../shared/utils/water-chemistry'

const BOUNDS: RangeBound[] = ['actBelow', 'watchBelow', 'watchAbove', 'actAbove', 'target']
const koi = DEFAULT_PROFILES.koi_pond.ranges
const garden = DEFAULT_PROFILES.water_garden.ranges
const pondless = DEFAULT_PROFILES.pondless.ranges
const kindOf = (r: ParameterRange | undefined, b: RangeBound) => r?.boundSources?.[b]?.sourceKind

describe('published bounds in the default profiles (P, CHECKS.md §7)', () => {
  it('pH act outside 6.5–9.5 — Stone & Thomforde, Univ. of Arkansas at Pine Bluff extension', () => {
    expect(koi.pH).toMatchObject({ actBelow: 6.5, actAbove: 9.5 })
    expect(koi.pH!.boundSources!.actBelow).toEqual({ source: expect.stringContaining('Stone & Thomforde'), sourceKind: 'published' })
    expect(kindOf(koi.pH, 'actAbove')).toBe('published')
  })
  it('KH act below 20 mg/L as CaCO3 — SRAC Liming Ponds for Aquaculture; US EPA criteria', () => {
    for (const p of [koi, garden, pondless]) {
      expect(p.khMgL!.actBelow).toBe(20)
      expect(p.khMgL!.boundSources!.actBelow!.source).toMatch(/EPA/)
      expect(kindOf(p.khMgL, 'actBelow')).toBe('published')
    }
  })
  it('un-ionized ammonia act above 0.05 mg/L — UF/IFAS FA16 (Francis-Floyd et al.)', () => {
    expect(koi.nh3MgL!.actAbove).toBe(0.05)
    expect(koi.nh3MgL!.boundSources!.actAbove!.source).toMatch(/FA16/)
    expect(kindOf(koi.nh3MgL, 'actAbove')).toBe('published')
  })
  it('chlorine: any detectable is act — US EPA National Recommended Water Quality Criteria (0.011 mg/L)', () => {
    expect(koi.chlorineMgL!.actAbove).toBe(0)
    expect(koi.chlorineMgL!.sourceKind).toBe('published')
    expect(koi.chlorineMgL!.source).toMatch(/US EPA National Recommended Water Quality Criteria/)
  })
  it('salt act above 5 g/L (0.5 %, the bath level) — UF/IFAS VM 86', () => {
    expect(koi.saltGL!.actAbove).toBe(5)
    expect(koi.saltGL!.boundSources!.actAbove!.source).toMatch(/VM 86/)
  })
})

describe("the product's stated defaults — common practice, no source (CHECKS.md §7)", () => {
  it('koi pond', () => {
    expect(koi.pH).toMatchObject({ watchBelow: 7.0, watchAbove: 8.5 })
    expect(koi.khMgL).toMatchObject({ watchBelow: 100, target: 120 })
    expect(koi.nh3MgL!.watchAbove).toBe(0.02)
    expect(koi.totalAmmoniaMgL).toMatchObject({ watchAbove: 0.25, actAbove: 1.0, target: 0.1 })
    expect(koi.nitriteMgL).toMatchObject({ watchAbove: 0.1, actAbove: 0.25 })
    expect(koi.nitrateMgL).toMatchObject({ watchAbove: 20, actAbove: 50 })
    expect(koi.dissolvedOxygenMgL).toMatchObject({ actBelow: 5, watchBelow: 6 })
    expect(koi.doSaturationPct!.watchBelow).toBe(70)
    expect(koi.temperatureC).toMatchObject({ watchAbove: 27, actAbove: 31 })
    expect(koi.saltGL!.watchAbove).toBe(3)
    expect(koi.phosphateMgL!.watchAbove).toBe(0.5)
    for (const [p, b] of [['pH', 'watchBelow'], ['khMgL', 'target'], ['nh3MgL', 'watchAbove'], ['totalAmmoniaMgL', 'actAbove'],
      ['nitriteMgL', 'actAbove'], ['dissolvedOxygenMgL', 'actBelow'], ['temperatureC', 'actAbove'], ['saltGL', 'watchAbove']] as const) {
      expect(kindOf(koi[p], b)).toBe('common practice')
    }
  })
  it('water garden: looser pH and KH', () => {
    expect(garden.pH).toMatchObject({ watchBelow: 6.5, watchAbove: 9.0, actBelow: 6.5, actAbove: 9.5 })
    expect(garden.khMgL).toMatchObject({ watchBelow: 50, target: 80 })
    expect(garden.nh3MgL).toEqual(koi.nh3MgL)
  })
  it('pondless (no fish): no ammonia, nitrite or oxygen limits', () => {
    expect(pondless.pH).toMatchObject({ actBelow: 6.0, watchBelow: 6.5, watchAbove: 9.0, actAbove: 9.5 })
    expect(pondless.chlorineMgL!.watchAbove).toBe(0)
    expect(pondless.saltGL!.watchAbove).toBe(1)
    expect(pondless.phosphateMgL!.watchAbove).toBe(0.5)
    for (const p of ['totalAmmoniaMgL', 'nh3MgL', 'nitriteMgL', 'dissolvedOxygenMgL', 'doSaturationPct'] as const) expect(pondless[p]).toBeUndefined()
    expect(pondless.pH!.sourceKind).toBe('common practice')
  })
})

describe('profile honesty', () => {
  it('every bound names a source; a range is "published" only when all its bounds are', () => {
    for (const profile of Object.values(DEFAULT_PROFILES)) {
      for (const p of PARAMETERS) {
        const r = profile.ranges[p]
        if (!r) continue
        expect(r.source.length).toBeGreaterThan(5)
        for (const b of BOUNDS) {
          if (r[b] === undefined) continue
          const src = r.boundSources![b]!
          expect(src.source.length).toBeGreaterThan(5)
          if (src.sourceKind === 'common practice') expect(src.source).toMatch(/common practice/)
        }
        const all = BOUNDS.filter(b => r[b] !== undefined).every(b => r.boundSources![b]!.sourceKind === 'published')
        expect(r.sourceKind).toBe(all ? 'published' : 'common practice')
      }
    }
  })
  it('bounds are ordered: actBelow ≤ watchBelow < watchAbove ≤ actAbove', () => {
    for (const profile of Object.values(DEFAULT_PROFILES)) {
      for (const r of Object.values(profile.ranges)) {
        if (r.actBelow !== undefined && r.watchBelow !== undefined) expect(r.actBelow).toBeLessThanOrEqual(r.watchBelow)
        if (r.watchAbove !== undefined && r.actAbove !== undefined) expect(r.watchAbove).toBeLessThanOrEqual(r.actAbove)
        if (r.watchBelow !== undefined && r.watchAbove !== undefined) expect(r.watchBelow).toBeLessThan(r.watchAbove)
      }
    }
  })
})

describe('profileKeyForKind', () => {
  it('maps every feature kind', () => {
    expect(profileKeyForKind('koi_pond')).toBe('koi_pond')
    for (const k of ['water_garden', 'stream', 'wetland_filter'] as const) expect(profileKeyForKind(k)).toBe('water_garden')
    for (const k of ['pondless_waterfall', 'fountain'] as const) expect(profileKeyForKind(k)).toBe('pondless')
    for (const k of FEATURE_KINDS) expect(DEFAULT_PROFILES[profileKeyForKind(k)]).toBeDefined()
  })
  it('rejects an unknown kind', () => {
    expect(() => profileKeyForKind('lake' as never)).toThrow(WaterInputError)
  })
})

describe('mergeRanges', () => {
  it('merges bounds per parameter, keeps the rest, does not mutate the base', () => {
    const before = JSON.stringify(koi)
    const merged = mergeRanges(koi, { pH: { watchAbove: 8.8, source: 'set for this feature', sourceKind: 'common practice' } })
    expect(merged.pH).toMatchObject({ actBelow: 6.5, watchBelow: 7.0, watchAbove: 8.8, actAbove: 9.5, source: 'set for this feature' })
    expect(merged.pH!.boundSources!.watchAbove).toEqual({ source: 'set for this feature', sourceKind: 'common practice' })
    expect(merged.pH!.boundSources!.actBelow!.sourceKind).toBe('published')
    expect(merged.khMgL).toEqual(koi.khMgL)
    expect(JSON.stringify(koi)).toBe(before)
  })
  it('adds a parameter the base lacks; null or undefined overrides change nothing', () => {
    const merged = mergeRanges(pondless, { ghMgL: { watchBelow: 50, source: 'set for this feature', sourceKind: 'common practice' } })
    expect(merged.ghMgL!.watchBelow).toBe(50)
    expect(mergeRanges(koi, null)).toEqual(koi)
    expect(mergeRanges(koi)).toEqual(koi)
  })
  it('rangesForKind = default profile for the kind + overrides', () => {
    expect(rangesForKind('stream')).toEqual(garden)
    expect(rangesForKind('koi_pond', { khMgL: { target: 140, source: 'owner', sourceKind: 'common practice' } }).khMgL!.target).toBe(140)
  })
})

describe('profile names and where each bound comes from, as a person reads it', () => {
  it('keys and names', () => {
    expect(Object.values(DEFAULT_PROFILES).map(p => [p.key, p.name])).toEqual([
      ['koi_pond', 'Koi pond'], ['water_garden', 'Water garden'], ['pondless', 'Pondless feature (no fish)'],
    ])
  })
  it('a range with bounds from two sources names each with its bounds', () => {
    expect(koi.pH!.source).toBe('Stone & Thomforde, Univ. of Arkansas at Pine Bluff extension: act below, act above; common practice, no published source (koi ponds 7.0–8.5): watch below, watch above')
    expect(koi.nh3MgL!.source).toBe('common practice, no published source (chronic limit): watch above; UF/IFAS FA16 (Francis-Floyd et al.), Ammonia in Aquatic Systems: act above')
    expect(koi.khMgL!.source).toBe('SRAC, Liming Ponds for Aquaculture; US EPA National Recommended Water Quality Criteria: act below; common practice, no published source (koi ponds at least 100 mg/L): watch below; common practice, no published source: target')
    expect(koi.totalAmmoniaMgL!.source).toBe('common practice, no published source')
    expect(koi.nitriteMgL!.boundSources!.watchAbove!.source).toBe('common practice, no published source (0 in an established pond)')
    expect(koi.saltGL!.boundSources!.watchAbove!.source).toBe('common practice, no published source (standing pond level 0.1–0.3 %)')
    expect(koi.temperatureC!.boundSources!.watchAbove!.source).toMatch(/^common practice, no published source \(koi comfortable about 15–25/)
    expect(pondless.pH!.source).toBe('common practice, no published source (no fish)')
    expect(pondless.chlorineMgL!.source).toBe('common practice, no published source (no fish; after the US EPA total residual chlorine criterion)')
    expect(pondless.saltGL!.source).toBe('common practice, no published source (plants)')
    expect(garden.khMgL!.source).toMatch(/: act below; common practice, no published source: watch below, target$/)
  })
  it('every bound of the defaults is there with its value (the rest of the table)', () => {
    expect(koi.nitrateMgL!.boundSources!.actAbove!.sourceKind).toBe('common practice')
    expect(garden.pH!.boundSources!.watchAbove!.sourceKind).toBe('common practice')
    expect(pondless.khMgL).toMatchObject({ actBelow: 20, sourceKind: 'published' })
    expect(koi.doSaturationPct!.sourceKind).toBe('common practice')
    expect(koi.phosphateMgL!.boundSources!.watchAbove!.sourceKind).toBe('common practice')
    expect(koi.chlorineMgL!.boundSources).toEqual({ actAbove: { source: expect.stringContaining('EPA'), sourceKind: 'published' } })
  })
  it('an unknown kind names the field and the kind', () => {
    try { profileKeyForKind('lake' as never); throw new Error('did not throw') }
    catch (e) { expect([(e as WaterInputError).field, (e as Error).message]).toEqual(['kind', 'Unknown feature kind "lake"']) }
  })
})

describe('mergeRanges: sources of overridden bounds', () => {
  it('a bound the override sets takes the override\'s own bound source, else its source', () => {
    const base = { pH: { watchAbove: 8, source: 'a', sourceKind: 'published' as const } }
    const merged = mergeRanges(base, { pH: { watchBelow: 7, boundSources: { watchBelow: { source: 'b', sourceKind: 'common practice' } } } as never })
    expect(merged.pH).toEqual({ watchAbove: 8, watchBelow: 7, source: 'a', sourceKind: 'common practice', boundSources: { watchBelow: { source: 'b', sourceKind: 'common practice' } } })
    // an override without any source leaves the bound without one, and keeps the base's words
    expect(mergeRanges(base, { pH: { watchBelow: 7 } as never }).pH).toEqual({ watchAbove: 8, watchBelow: 7, source: 'a', sourceKind: 'published' })
  })
  it('a parameter only the override has, and copies that do not share the base\'s objects', () => {
    expect(mergeRanges({}, { pH: { watchBelow: 7, source: 'o', sourceKind: 'common practice' } })).toEqual({
      pH: { watchBelow: 7, source: 'o', sourceKind: 'common practice', boundSources: { watchBelow: { source: 'o', sourceKind: 'common practice' } } },
    })
    const copy = mergeRanges(koi, {})
    expect(copy.pH).toEqual(koi.pH)
    expect(copy.pH).not.toBe(koi.pH)
    expect(copy.pH!.boundSources).not.toBe(koi.pH!.boundSources)
    const plain = { ghMgL: { watchBelow: 50, source: 'x', sourceKind: 'common practice' as const } }
    expect(mergeRanges(plain, null)).toEqual(plain)
    expect(Object.keys(mergeRanges(plain, null).ghMgL!)).not.toContain('boundSources')
  })
  it('a published bound overridden by the owner makes the range common practice', () => {
    const merged = mergeRanges(koi, { chlorineMgL: { actAbove: 0.01, source: 'owner', sourceKind: 'common practice' } })
    expect(merged.chlorineMgL).toMatchObject({ actAbove: 0.01, source: 'owner', sourceKind: 'common practice' })
    const again = mergeRanges(koi, { chlorineMgL: { actAbove: 0.02, source: 'lab sheet', sourceKind: 'published' } })
    expect(again.chlorineMgL!.sourceKind).toBe('published')
  })
})
