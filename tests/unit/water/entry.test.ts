import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import * as entry from '../../../shared/utils/water-chemistry'
import * as ammonia from '../../../shared/utils/water/ammonia'
import * as dosing from '../../../shared/utils/water/dosing'
import * as errors from '../../../shared/utils/water/errors'
import * as evaluate from '../../../shared/utils/water/evaluate'
import * as format from '../../../shared/utils/water/format'
import * as oxygen from '../../../shared/utils/water/oxygen'
import * as parameters from '../../../shared/utils/water/parameters'
import * as profiles from '../../../shared/utils/water/profiles'
import * as units from '../../../shared/utils/water/units'
import * as volume from '../../../shared/utils/water/volume'

const modules = { ammonia, dosing, errors, evaluate, format, oxygen, parameters, profiles, units, volume }

describe('public entry point shared/utils/water-chemistry', () => {
  it('only re-exports the water modules', () => {
    const src = readFileSync(fileURLToPath(new URL('../../../shared/utils/water-chemistry.ts', import.meta.url)), 'utf8')
    const code = src.split('\n').map(l => l.trim()).filter(l => l && !l.startsWith('//'))
    for (const line of code) expect(line).toMatch(/^export \* from '\.\/water\/[a-z-]+'$/)
  })
  it('defines no export name twice (a clash would silently drop it from export *)', () => {
    const seen = new Map<string, string>()
    for (const [name, mod] of Object.entries(modules)) {
      for (const key of Object.keys(mod)) {
        expect(seen.has(key), `${key} in ${name} and ${seen.get(key)}`).toBe(false)
        seen.set(key, name)
      }
    }
    expect(new Set(Object.keys(entry))).toEqual(new Set(seen.keys()))
  })
  it('exposes the interface other code relies on', () => {
    const names = [
      'WaterInputError', 'unionizedAmmoniaFraction', 'unionizedAmmonia', 'nitrogenToAmmonia', 'ammoniaToNitrogen',
      'oxygenSaturationMgL', 'pressureAtAltitudeKPa', 'oxygenPercentSaturation',
      'US_GALLON_L', 'IMPERIAL_GALLON_L', 'litresToUsGallons', 'usGallonsToLitres', 'litresToImperialGallons', 'feetToMetres',
      'metresToFeet', 'inchesToMm', 'mmToInches', 'celsiusToFahrenheit', 'fahrenheitToCelsius', 'cubicFeetToLitres',
      'squareMetresToSquareFeet', 'dkhToMgLCaCO3', 'mgLCaCO3ToDkh', 'pptToPercent', 'percentToPpt', 'gramsToPounds',
      'kgToPounds', 'litresPerHourToUsGph', 'usGphToLitresPerHour',
      'featureVolumeLitres', 'featureSurfaceAreaM2',
      'dechlorinatorDose', 'bicarbonateForKH', 'saltToTarget', 'waterChangeFraction', 'turnoverPerHour', 'dailyWaterLossMm',
      'topUpLitresToMm', 'EVAPORATION_ALLOWANCE_MM_PER_DAY', 'waterLossStatus', 'dosingSuggestions',
      'DEFAULT_PROFILES', 'profileKeyForKind', 'mergeRanges', 'evaluateReading',
    ]
    for (const n of names) expect(entry, n).toHaveProperty(n)
  })
  it('WaterInputError is a RangeError carrying the field', () => {
    const e = new entry.WaterInputError('pH', 'pH must be between 0 and 14')
    expect(e).toBeInstanceOf(RangeError)
    expect(e.name).toBe('WaterInputError')
    expect(e.field).toBe('pH')
    expect(e.message).toBe('pH must be between 0 and 14')
  })
})
