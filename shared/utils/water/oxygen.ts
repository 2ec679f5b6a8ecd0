// Dissolved-oxygen saturation in fresh water. Benson, B.B., Krause, D. (1984), "The concentration and
// isotopic fractionation of oxygen dissolved in freshwater and seawater in equilibrium with the
// atmosphere", Limnol. Oceanogr. 29: 620–632; the form used by APHA Standard Methods 4500-O and USGS.
import { checkAltitudeM, checkPressureKPa, checkTempC, nonNegative } from './validate'

export const STANDARD_PRESSURE_KPA = 101.325
const KELVIN = 273.15

/** C* in mg/L at 1 atm (Benson & Krause 1984, fresh water). */
function saturationAt1Atm(t: number): number {
  const T = t + KELVIN
  return Math.exp(
    -139.34411
    + 1.575701e5 / T
    - 6.642308e7 / T ** 2
    + 1.243800e10 / T ** 3
    - 8.621949e11 / T ** 4,
  )
}

/** Water-vapour pressure u, atm: ln u = 11.8571 − 3840.70/T − 216961/T². */
export function waterVapourPressureAtm(tempC: number): number {
  const T = checkTempC(tempC) + KELVIN
  return Math.exp(11.8571 - 3840.70 / T - 216961 / T ** 2)
}

/**
 * Oxygen saturation, mg/L, at `tempC` and station pressure `pressureKPa` (not sea-level corrected):
 * Cp = C* · P · [(1 − u/P)(1 − θP)] / [(1 − u)(1 − θ)], P in atm, θ = 0.000975 − 1.426e−5·t + 6.436e−8·t².
 */
export function oxygenSaturationMgL(tempC: number, pressureKPa: number = STANDARD_PRESSURE_KPA): number {
  const t = checkTempC(tempC)
  const P = checkPressureKPa(pressureKPa) / STANDARD_PRESSURE_KPA
  const cStar = saturationAt1Atm(t)
  const u = waterVapourPressureAtm(t)
  const theta = 0.000975 - 1.426e-5 * t + 6.436e-8 * t * t
  return cStar * P * ((1 - u / P) * (1 - theta * P)) / ((1 - u) * (1 - theta))
}

/** Standard-atmosphere pressure at `altitudeM` above sea level: 101.325 × (1 − 2.25577e−5·h)^5.25588 kPa. */
export function pressureAtAltitudeKPa(altitudeM: number): number {
  const h = checkAltitudeM(altitudeM)
  return STANDARD_PRESSURE_KPA * (1 - 2.25577e-5 * h) ** 5.25588
}

/** Percent saturation of a dissolved-oxygen reading: 100 × DO / C*. */
export function oxygenPercentSaturation(doMgL: number, tempC: number, pressureKPa: number = STANDARD_PRESSURE_KPA): number {
  const d = nonNegative(doMgL, 'doMgL', 'Dissolved oxygen')
  return (100 * d) / oxygenSaturationMgL(tempC, pressureKPa)
}
