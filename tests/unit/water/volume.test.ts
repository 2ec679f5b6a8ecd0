import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { FeatureShape } from '../../../shared/types/water'
import {
  featureSurfaceAreaM2, featureVolumeLitres, featureVolumeUsGallons, feetToMetres, litresToUsGallons, WaterInputError,
} from '../../../shared/utils/water-chemistry'

const ft = feetToMetres

describe('volume examples (C, CHECKS.md §3; exact units from NIST Handbook 44)', () => {
  it('rectangle 10 × 6 ft × 2 ft mean depth → 897.66 US gal', () => {
    const shape: FeatureShape = { kind: 'rectangle', lengthM: ft(10), widthM: ft(6), depthM: ft(2) }
    expect(featureVolumeUsGallons(shape)).toBeCloseTo(897.66, 2)
    expect(litresToUsGallons(featureVolumeLitres(shape))).toBeCloseTo(120 * 1728 / 231, 9)
  })
  it('circle 10 ft diameter × 2 ft → 1175.0 US gal (π/4·D²·d·7.480519)', () => {
    const shape: FeatureShape = { kind: 'circle', diameterM: ft(10), depthM: ft(2) }
    expect(featureVolumeUsGallons(shape)).toBeCloseTo(1175.0, 1)
    expect(featureVolumeUsGallons(shape)).toBeCloseTo((Math.PI / 4) * 100 * 2 * (1728 / 231), 9)
  })
  it('negative check: the trade rule "diameter × depth × 23.5" is wrong (23.5 goes with radius²)', () => {
    const shape: FeatureShape = { kind: 'circle', diameterM: ft(10), depthM: ft(2) }
    const ours = featureVolumeUsGallons(shape)
    const wrongRule = 10 * 2 * 23.5 // 470 US gal
    const radiusRule = 5 ** 2 * 2 * 23.5 // 1175 US gal: the rule is right only with radius²
    expect(Math.abs(ours - wrongRule) / ours).toBeGreaterThan(0.5)
    expect(Math.abs(ours - radiusRule) / ours).toBeLessThan(0.001)
  })
})

describe('shapes (C: geometry)', () => {
  it('rectangle L·W·d in litres', () => {
    expect(featureVolumeLitres({ kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.5 })).toBeCloseTo(3000, 9)
    expect(featureSurfaceAreaM2({ kind: 'rectangle', lengthM: 3, widthM: 2, depthM: 0.5 })).toBeCloseTo(6, 12)
  })
  it('circle π/4·D²·d', () => {
    expect(featureVolumeLitres({ kind: 'circle', diameterM: 2, depthM: 1 })).toBeCloseTo(Math.PI * 1000, 9)
    expect(featureSurfaceAreaM2({ kind: 'circle', diameterM: 2, depthM: 1 })).toBeCloseTo(Math.PI, 12)
  })
  it('oval (ellipse) π/4·L·W·d', () => {
    expect(featureVolumeLitres({ kind: 'oval', lengthM: 4, widthM: 2, depthM: 0.6 })).toBeCloseTo((Math.PI / 4) * 4 * 2 * 0.6 * 1000, 9)
  })
  it('irregular: average length × average width × average depth (common practice, no source)', () => {
    expect(featureVolumeLitres({ kind: 'irregular', lengthM: 5, widthM: 3, avgDepthM: 0.45 })).toBeCloseTo(6750, 9)
    expect(featureSurfaceAreaM2({ kind: 'irregular', lengthM: 5, widthM: 3, avgDepthM: 0.45 })).toBeCloseTo(15, 12)
  })
  it('a shelf takes away lengthM·widthM·(depth − shelf depth); surface area ignores it', () => {
    const shape: FeatureShape = { kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 0.9, shelf: { lengthM: 6, widthM: 0.3, depthM: 0.25 } }
    expect(featureVolumeLitres(shape)).toBeCloseTo((4 * 3 * 0.9 - 6 * 0.3 * (0.9 - 0.25)) * 1000, 9)
    expect(featureSurfaceAreaM2(shape)).toBeCloseTo(12, 12)
  })
  it('a shelf at full depth changes nothing', () => {
    const shape: FeatureShape = { kind: 'circle', diameterM: 3, depthM: 0.8, shelf: { lengthM: 2, widthM: 0.3, depthM: 0.8 } }
    expect(featureVolumeLitres(shape)).toBeCloseTo(featureVolumeLitres({ kind: 'circle', diameterM: 3, depthM: 0.8 }), 9)
  })
})

describe('properties (fast-check)', () => {
  const dim = fc.double({ min: 0.05, max: 100, noNaN: true })
  it('volume is positive, finite and linear in depth', () => {
    fc.assert(fc.property(dim, dim, dim, (l, w, d) => {
      for (const s of [
        { kind: 'rectangle', lengthM: l, widthM: w, depthM: d },
        { kind: 'oval', lengthM: l, widthM: w, depthM: d },
        { kind: 'circle', diameterM: l, depthM: d },
        { kind: 'irregular', lengthM: l, widthM: w, avgDepthM: d },
      ] as FeatureShape[]) {
        const v = featureVolumeLitres(s)
        expect(Number.isFinite(v)).toBe(true)
        expect(v).toBeGreaterThan(0)
        const doubled = { ...s, ...(s.kind === 'irregular' ? { avgDepthM: 2 * d } : { depthM: 2 * d }) } as FeatureShape
        expect(featureVolumeLitres(doubled)).toBeCloseTo(2 * v, 6)
        expect(featureVolumeLitres(s)).toBeCloseTo(featureSurfaceAreaM2(s) * d * 1000, 6)
      }
    }))
  })
  it('a valid shelf never makes the volume negative', () => {
    fc.assert(fc.property(dim, dim, dim, fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (l, w, d, a, b) => {
      const shelf = { lengthM: l, widthM: Math.max(w * a, 1e-6), depthM: d * b }
      const v = featureVolumeLitres({ kind: 'rectangle', lengthM: l, widthM: w, depthM: d, shelf })
      expect(v).toBeGreaterThanOrEqual(-1e-9)
      expect(v).toBeLessThanOrEqual(l * w * d * 1000 * (1 + 1e-12))
    }))
  })
})

describe('input range (WaterInputError)', () => {
  const field = (fn: () => unknown) => {
    try { fn() } catch (e) { expect(e).toBeInstanceOf(WaterInputError); return (e as WaterInputError).field }
    throw new Error('did not throw')
  }
  it('names the field', () => {
    expect(field(() => featureVolumeLitres({ kind: 'rectangle', lengthM: -1, widthM: 2, depthM: 1 }))).toBe('shape.lengthM')
    expect(field(() => featureVolumeLitres({ kind: 'rectangle', lengthM: 1, widthM: 0, depthM: 1 }))).toBe('shape.widthM')
    expect(field(() => featureVolumeLitres({ kind: 'rectangle', lengthM: 1, widthM: 2, depthM: 0 }))).toBe('shape.depthM')
    expect(field(() => featureVolumeLitres({ kind: 'circle', diameterM: Number.NaN, depthM: 1 }))).toBe('shape.diameterM')
    expect(field(() => featureVolumeLitres({ kind: 'irregular', lengthM: 1, widthM: 2, avgDepthM: -0.1 }))).toBe('shape.avgDepthM')
    expect(field(() => featureVolumeLitres({ kind: 'hexagon' } as unknown as FeatureShape))).toBe('shape.kind')
  })
  it('rejects a shelf deeper than the feature or larger than the surface', () => {
    expect(field(() => featureVolumeLitres({ kind: 'rectangle', lengthM: 2, widthM: 2, depthM: 0.5, shelf: { lengthM: 1, widthM: 0.3, depthM: 0.6 } }))).toBe('shape.shelf.depthM')
    expect(field(() => featureVolumeLitres({ kind: 'rectangle', lengthM: 2, widthM: 2, depthM: 0.5, shelf: { lengthM: 5, widthM: 1, depthM: 0.2 } }))).toBe('shape.shelf')
    expect(field(() => featureSurfaceAreaM2({ kind: 'rectangle', lengthM: 2, widthM: 2, depthM: 0.5, shelf: { lengthM: -1, widthM: 1, depthM: 0.2 } }))).toBe('shape.shelf.lengthM')
  })
})

describe('input errors a person reads: the field and its label', () => {
  const error = (fn: () => unknown) => {
    try { fn() } catch (e) { expect(e).toBeInstanceOf(WaterInputError); return [(e as WaterInputError).field, (e as Error).message] }
    throw new Error('did not throw')
  }
  const shelf = (s: Partial<{ lengthM: number, widthM: number, depthM: number }>) => ({ kind: 'rectangle', lengthM: 4, widthM: 3, depthM: 1, shelf: { lengthM: 2, widthM: 0.5, depthM: 0.3, ...s } }) as FeatureShape
  it.each([
    [null, 'shape', 'shape is required'],
    ['round', 'shape', 'shape is required'],
    [{ kind: 'hexagon' }, 'shape.kind', 'Unknown shape "hexagon"'],
    [{ kind: 'rectangle', lengthM: 0, widthM: 1, depthM: 1 }, 'shape.lengthM', 'Length must be greater than zero'],
    [{ kind: 'rectangle', lengthM: 1, widthM: -1, depthM: 1 }, 'shape.widthM', 'Width must be greater than zero'],
    [{ kind: 'rectangle', lengthM: 1, widthM: 1, depthM: Number.NaN }, 'shape.depthM', 'Depth must be a finite number'],
    [{ kind: 'circle', diameterM: 0, depthM: 1 }, 'shape.diameterM', 'Diameter must be greater than zero'],
    [{ kind: 'circle', diameterM: 1, depthM: 0 }, 'shape.depthM', 'Depth must be greater than zero'],
    [{ kind: 'oval', lengthM: 0, widthM: 1, depthM: 1 }, 'shape.lengthM', 'Length must be greater than zero'],
    [{ kind: 'oval', lengthM: 1, widthM: 0, depthM: 1 }, 'shape.widthM', 'Width must be greater than zero'],
    [{ kind: 'oval', lengthM: 1, widthM: 1, depthM: 0 }, 'shape.depthM', 'Depth must be greater than zero'],
    [{ kind: 'irregular', lengthM: 0, widthM: 1, avgDepthM: 1 }, 'shape.lengthM', 'Average length must be greater than zero'],
    [{ kind: 'irregular', lengthM: 1, widthM: 0, avgDepthM: 1 }, 'shape.widthM', 'Average width must be greater than zero'],
    [{ kind: 'irregular', lengthM: 1, widthM: 1, avgDepthM: 0 }, 'shape.avgDepthM', 'Average depth must be greater than zero'],
    [{ kind: 'rectangle', lengthM: 1, widthM: 1, depthM: 1, shelf: 'edge' }, 'shape.shelf', 'shelf must be an object'],
    [shelf({ lengthM: 0 }), 'shape.shelf.lengthM', 'Shelf length must be greater than zero'],
    [shelf({ widthM: 0 }), 'shape.shelf.widthM', 'Shelf width must be greater than zero'],
    [shelf({ depthM: -0.1 }), 'shape.shelf.depthM', 'Shelf depth must not be negative'],
    [shelf({ depthM: 1.01 }), 'shape.shelf.depthM', 'A shelf cannot be deeper than the feature'],
    [shelf({ lengthM: 6, widthM: 2.01 }), 'shape.shelf', 'A shelf cannot cover more area than the water surface'],
  ])('%#: %j', (shape, field, message) => {
    expect(error(() => featureVolumeLitres(shape as FeatureShape))).toEqual([field, message])
    expect(error(() => featureSurfaceAreaM2(shape as FeatureShape))).toEqual([field, message])
  })
  it('a shelf exactly as deep as the feature, or covering the whole surface, is allowed; a null shelf is none', () => {
    expect(featureVolumeLitres(shelf({ depthM: 1 }))).toBeCloseTo(12_000, 9)
    expect(featureVolumeLitres(shelf({ lengthM: 6, widthM: 2, depthM: 0.5 }))).toBeCloseTo(6000, 9) // 12 m² × (1 − 0.5) m
    expect(featureVolumeLitres({ kind: 'circle', diameterM: 2, depthM: 1, shelf: null as never })).toBeCloseTo(Math.PI * 1000, 9)
    expect(featureSurfaceAreaM2({ kind: 'oval', lengthM: 4, widthM: 2, depthM: 1, shelf: null as never })).toBeCloseTo(2 * Math.PI, 12)
  })
})
