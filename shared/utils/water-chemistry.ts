// Public entry point of the water-chemistry engine: re-exports only.
export * from './water/errors'
export * from './water/units'
export * from './water/ammonia'
export * from './water/oxygen'
export * from './water/volume'
export * from './water/profiles'
export * from './water/evaluate'
export * from './water/dosing'
