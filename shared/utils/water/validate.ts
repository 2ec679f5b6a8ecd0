// Input checks shared by the water modules. Internal: not re-exported from the public entry point.
import { WaterInputError } from './errors'

/** Liquid pond water: 0–45 °C. */
export const TEMP_MIN_C = 0
export const TEMP_MAX_C = 45
export const PRESSURE_MIN_KPA = 50
export const PRESSURE_MAX_KPA = 110
export const ALTITUDE_MIN_M = -500
export const ALTITUDE_MAX_M = 6000

export function finite(value: unknown, field: string, label = field): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new WaterInputError(field, `${label} must be a finite number`)
  }
  return value
}

export function nonNegative(value: unknown, field: string, label = field): number {
  const v = finite(value, field, label)
  if (v < 0) throw new WaterInputError(field, `${label} must not be negative`)
  return v
}

export function positive(value: unknown, field: string, label = field): number {
  const v = finite(value, field, label)
  if (v <= 0) throw new WaterInputError(field, `${label} must be greater than zero`)
  return v
}

export function between(value: unknown, field: string, min: number, max: number, label = field, unit = ''): number {
  const v = finite(value, field, label)
  if (v < min || v > max) {
    throw new WaterInputError(field, `${label} must be between ${min}${unit} and ${max}${unit}`)
  }
  return v
}

export function checkPH(value: unknown, field = 'pH'): number {
  return between(value, field, 0, 14, 'pH')
}

export function checkTempC(value: unknown, field = 'tempC'): number {
  return between(value, field, TEMP_MIN_C, TEMP_MAX_C, 'Water temperature', ' °C')
}

export function checkPressureKPa(value: unknown, field = 'pressureKPa'): number {
  return between(value, field, PRESSURE_MIN_KPA, PRESSURE_MAX_KPA, 'Air pressure', ' kPa')
}

export function checkAltitudeM(value: unknown, field = 'altitudeM'): number {
  return between(value, field, ALTITUDE_MIN_M, ALTITUDE_MAX_M, 'Altitude', ' m')
}
