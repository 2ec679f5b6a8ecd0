import { describe, expect, it } from 'vitest'
import { PARAMETERS } from '../../../shared/types/water'
import {
  formatParameter, MEASURED_PARAMETERS, PARAMETER_CATALOGUE, PARAMETER_LIST, parameterDigits, parameterFromDisplay, parameterHeading,
  parameterInfo, parameterToDisplay, parameterUnit, READING_KEYS,
} from '../../../shared/utils/water/parameters'
import { foreignUnits } from '../../helpers/units-scan'

// The one catalogue of water parameters (ARCHITECTURE.md "One home per concept"). Conversions:
// NIST Handbook 44 (°F = °C × 9/5 + 32; 1 in = 25.4 mm); CSV columns stay SI.
describe('the parameter catalogue', () => {
  it('holds every parameter the engine rates, plus the water level, in reading order', () => {
    expect(READING_KEYS.filter(k => k !== 'waterLevelMm')).toEqual([...PARAMETERS])
    expect(PARAMETER_LIST.map(p => p.key)).toEqual([...READING_KEYS])
    for (const k of READING_KEYS) expect(PARAMETER_CATALOGUE[k].key).toBe(k)
    expect(parameterInfo('pH').label).toBe('pH')
  })
  it('computed values are not typed in', () => {
    expect(MEASURED_PARAMETERS.map(p => p.key)).not.toContain('nh3MgL')
    expect(MEASURED_PARAMETERS.map(p => p.key)).not.toContain('doSaturationPct')
    expect(MEASURED_PARAMETERS).toHaveLength(READING_KEYS.length - 2)
  })
  it('CSV columns are unique snake case in SI units', () => {
    const cols = PARAMETER_LIST.map(p => p.column)
    expect(new Set(cols).size).toBe(cols.length)
    for (const c of cols) expect(c).toMatch(/^[a-z0-9_]+$/)
    expect(PARAMETER_CATALOGUE.temperatureC.column).toBe('temperature_c')
  })
  it('units and headings in each system', () => {
    expect(parameterUnit('temperatureC', 'us')).toBe('°F')
    expect(parameterUnit('temperatureC', 'metric')).toBe('°C')
    expect(parameterUnit('waterLevelMm', 'us')).toBe('in')
    expect(parameterUnit('waterLevelMm', 'metric')).toBe('cm')
    expect(parameterUnit('saltGL', 'us')).toBe('%')
    expect(parameterHeading('temperatureC', 'us')).toBe('Water temperature (°F)')
    expect(parameterHeading('khMgL', 'metric')).toBe('KH (mg/L as CaCO3)')
    expect(parameterHeading('waterLevelMm', 'metric')).toBe('Water level (cm)')
    expect(parameterHeading('pH', 'us')).toBe('pH')
    for (const system of ['us', 'metric'] as const) {
      for (const k of READING_KEYS) expect(foreignUnits(parameterHeading(k, system), system), k).toEqual([])
    }
  })
  it('digits: a parameter\'s own for concentrations, the kind\'s otherwise', () => {
    expect(parameterDigits('nh3MgL', 'us')).toBe(3)
    expect(parameterDigits('khMgL', 'metric')).toBe(0)
    expect(parameterDigits('doSaturationPct', 'metric')).toBe(0)
    expect(parameterDigits('temperatureC', 'us')).toBe(1)
    expect(parameterDigits('waterLevelMm', 'us')).toBe(2)
  })
  it('values shown and typed (NIST HB 44)', () => {
    expect(formatParameter('temperatureC', 26, 'us')).toBe('78.8 °F')
    expect(formatParameter('temperatureC', 26, 'metric')).toBe('26 °C')
    expect(formatParameter('nh3MgL', 0.21412, 'us')).toBe('0.214 mg/L')
    expect(formatParameter('khMgL', 90.4, 'us')).toBe('90 mg/L')
    expect(formatParameter('pH', 8, 'metric')).toBe('8.0')
    expect(formatParameter('waterLevelMm', 25.4, 'us')).toBe('1 in')
    expect(formatParameter('saltGL', 1.5, 'us', { bare: true })).toBe('0.15')
    expect(formatParameter('khMgL', 90.46, 'metric', { digits: 1 })).toBe('90.5 mg/L')
    expect(parameterToDisplay('temperatureC', 100, 'us')).toBeCloseTo(212, 12)
    expect(parameterFromDisplay('temperatureC', 32, 'us')).toBeCloseTo(0, 12)
    expect(parameterFromDisplay('waterLevelMm', 1, 'us')).toBeCloseTo(25.4, 12)
    expect(parameterToDisplay('totalAmmoniaMgL', 0.5, 'us')).toBe(0.5)
  })
})

describe('each parameter as forms, charts and exports read it', () => {
  it.each([
    ['temperatureC', 'Water temperature (°F)', 'Water temperature (°C)', '°C', 'temperature'],
    ['pH', 'pH', 'pH', '', 'ph'],
    ['totalAmmoniaMgL', 'Total ammonia (TAN) (mg/L as N)', 'Total ammonia (TAN) (mg/L as N)', 'mg/L', 'ammonia'],
    ['nh3MgL', 'Un-ionized ammonia (mg/L as NH3)', 'Un-ionized ammonia (mg/L as NH3)', 'mg/L', 'ammonia'],
    ['nitriteMgL', 'Nitrite (mg/L as NO2)', 'Nitrite (mg/L as NO2)', 'mg/L', 'nitrite'],
    ['nitrateMgL', 'Nitrate (mg/L as NO3)', 'Nitrate (mg/L as NO3)', 'mg/L', 'nitrate'],
    ['khMgL', 'KH (mg/L as CaCO3)', 'KH (mg/L as CaCO3)', 'mg/L', 'hardness'],
    ['ghMgL', 'GH (mg/L as CaCO3)', 'GH (mg/L as CaCO3)', 'mg/L', 'hardness'],
    ['dissolvedOxygenMgL', 'Dissolved oxygen (mg/L)', 'Dissolved oxygen (mg/L)', 'mg/L', 'oxygen'],
    ['doSaturationPct', 'Oxygen saturation (%)', 'Oxygen saturation (%)', '%', 'oxygen'],
    ['saltGL', 'Salt (%)', 'Salt (g/L)', 'g/L', 'salt'],
    ['chlorineMgL', 'Chlorine (mg/L as Cl2)', 'Chlorine (mg/L as Cl2)', 'mg/L', 'chlorine'],
    ['phosphateMgL', 'Phosphate (mg/L as PO4)', 'Phosphate (mg/L as PO4)', 'mg/L', 'phosphate'],
    ['waterLevelMm', 'Water level (in)', 'Water level (cm)', 'mm', 'level'],
  ] as const)('%s', (key, us, metric, siUnit, group) => {
    expect(parameterHeading(key, 'us')).toBe(us)
    expect(parameterHeading(key, 'metric')).toBe(metric)
    // stored in the SI (or lab) unit shared/types/water.ts states for the reading
    expect(PARAMETER_CATALOGUE[key].siUnit).toBe(siUnit)
    expect(PARAMETER_CATALOGUE[key].group).toBe(group)
    expect(PARAMETER_CATALOGUE[key].plain.length).toBeGreaterThan(1)
  })
  it('the water level is read against the mark', () => {
    expect(PARAMETER_CATALOGUE.waterLevelMm.basis).toBe('against the mark')
    expect(PARAMETER_CATALOGUE.waterLevelMm.plain).toBe('Water level')
  })
})
