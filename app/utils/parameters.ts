import type { Parameter } from '#shared/types/water'

/** Display names of the range parameters, with the SI units the ranges are kept in. */
export const PARAMETER_LABELS: Record<Parameter, string> = {
  temperatureC: 'Temperature (°C)', pH: 'pH', totalAmmoniaMgL: 'Total ammonia (mg/L)', nh3MgL: 'Un-ionized ammonia (mg/L NH3)',
  nitriteMgL: 'Nitrite (mg/L)', nitrateMgL: 'Nitrate (mg/L)', khMgL: 'KH (mg/L as CaCO3)', ghMgL: 'GH (mg/L as CaCO3)',
  dissolvedOxygenMgL: 'Dissolved oxygen (mg/L)', doSaturationPct: 'Oxygen saturation (%)', saltGL: 'Salt (ppt)',
  chlorineMgL: 'Chlorine (mg/L)', phosphateMgL: 'Phosphate (mg/L)',
}
