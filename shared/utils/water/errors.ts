/**
 * Thrown when an input to the water-chemistry engine is outside its physical range.
 * `field` names the argument or field (e.g. 'pH', 'tempC', 'volumeL', 'shape.lengthM').
 */
export class WaterInputError extends RangeError {
  readonly field: string

  constructor(field: string, message: string) {
    super(message)
    this.name = 'WaterInputError'
    this.field = field
  }
}
