// Volume and surface area of a feature from its outline and depth. Metres in, litres / m² out.
import type { FeatureShape, Shelf } from '../../types/water'
import { WaterInputError } from './errors'
import { litresToUsGallons } from './units'
import { nonNegative, positive } from './validate'

interface Outline { areaM2: number, depthM: number, depthField: string }

function outline(shape: FeatureShape): Outline {
  if (shape === null || typeof shape !== 'object') throw new WaterInputError('shape', 'shape is required')
  switch (shape.kind) {
    case 'rectangle': {
      const l = positive(shape.lengthM, 'shape.lengthM', 'Length')
      const w = positive(shape.widthM, 'shape.widthM', 'Width')
      return { areaM2: l * w, depthM: positive(shape.depthM, 'shape.depthM', 'Depth'), depthField: 'shape.depthM' }
    }
    case 'circle': {
      const d = positive(shape.diameterM, 'shape.diameterM', 'Diameter')
      return { areaM2: (Math.PI / 4) * d * d, depthM: positive(shape.depthM, 'shape.depthM', 'Depth'), depthField: 'shape.depthM' }
    }
    case 'oval': {
      // An ellipse with axes `lengthM` and `widthM`.
      const l = positive(shape.lengthM, 'shape.lengthM', 'Length')
      const w = positive(shape.widthM, 'shape.widthM', 'Width')
      return { areaM2: (Math.PI / 4) * l * w, depthM: positive(shape.depthM, 'shape.depthM', 'Depth'), depthField: 'shape.depthM' }
    }
    case 'irregular': {
      // Common practice for free-form ponds: average length × average width × average depth.
      const l = positive(shape.lengthM, 'shape.lengthM', 'Average length')
      const w = positive(shape.widthM, 'shape.widthM', 'Average width')
      return { areaM2: l * w, depthM: positive(shape.avgDepthM, 'shape.avgDepthM', 'Average depth'), depthField: 'shape.avgDepthM' }
    }
    default:
      throw new WaterInputError('shape.kind', `Unknown shape "${String((shape as { kind?: unknown }).kind)}"`)
  }
}

function shelfReductionM3(shelf: Shelf, o: Outline): number {
  if (shelf === null || typeof shelf !== 'object') throw new WaterInputError('shape.shelf', 'shelf must be an object')
  const l = positive(shelf.lengthM, 'shape.shelf.lengthM', 'Shelf length')
  const w = positive(shelf.widthM, 'shape.shelf.widthM', 'Shelf width')
  const d = nonNegative(shelf.depthM, 'shape.shelf.depthM', 'Shelf depth')
  if (d > o.depthM) throw new WaterInputError('shape.shelf.depthM', 'A shelf cannot be deeper than the feature')
  if (l * w > o.areaM2) throw new WaterInputError('shape.shelf', 'A shelf cannot cover more area than the water surface')
  return l * w * (o.depthM - d)
}

/**
 * Water volume in litres. Rectangle L·W·d; circle π/4·D²·d; oval (ellipse) π/4·L·W·d; irregular
 * L·W·average depth (average length and width: common practice). A shelf is a shallower band
 * inside the outline and takes away lengthM·widthM·(depth − shelf depth).
 */
export function featureVolumeLitres(shape: FeatureShape): number {
  const o = outline(shape)
  let m3 = o.areaM2 * o.depthM
  if (shape.shelf != null) m3 -= shelfReductionM3(shape.shelf, o)
  return m3 * 1000
}

/** Volume in US gallons (for display). */
export function featureVolumeUsGallons(shape: FeatureShape): number {
  return litresToUsGallons(featureVolumeLitres(shape))
}

/** Water surface area in m² (shelves do not change it). */
export function featureSurfaceAreaM2(shape: FeatureShape): number {
  const o = outline(shape)
  if (shape.shelf != null) shelfReductionM3(shape.shelf, o) // validates the shelf
  return o.areaM2
}
