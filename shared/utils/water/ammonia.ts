// Un-ionized ammonia. Emerson, K., Russo, R.C., Lund, R.E., Thurston, R.V. (1975), "Aqueous ammonia
// equilibrium calculations: effect of pH and temperature", J. Fish. Res. Board Can. 32(12): 2379–2383.
import { MOLAR_MASS } from './units'
import { checkPH, checkTempC, nonNegative } from './validate'

const EMERSON_A = 0.09018
/** Emerson et al. (1975). Note: some copies misprint this as 2727.92. */
const EMERSON_B = 2729.92
const KELVIN = 273.15

/** pKa of NH4+ at `tempC`: 0.09018 + 2729.92 / T (Emerson et al. 1975). */
export function ammoniaPKa(tempC: number): number {
  const t = checkTempC(tempC)
  return EMERSON_A + EMERSON_B / (t + KELVIN)
}

/** Fraction (0..1) of total ammonia present as un-ionized NH3: 1 / (1 + 10^(pKa − pH)). */
export function unionizedAmmoniaFraction(pH: number, tempC: number): number {
  const p = checkPH(pH)
  const pKa = ammoniaPKa(tempC)
  return 1 / (1 + 10 ** (pKa - p))
}

/** Un-ionized ammonia from total ammonia, on the same basis as the input (as N in → as N out). */
export function unionizedAmmonia(tanMgL: number, pH: number, tempC: number): number {
  const tan = nonNegative(tanMgL, 'tanMgL', 'Total ammonia')
  return tan * unionizedAmmoniaFraction(pH, tempC)
}

/** mg/L as NH3 per mg/L as N: 17.031 / 14.007 = 1.2159. */
export const NH3_PER_N = MOLAR_MASS.NH3 / MOLAR_MASS.N

/** Ammonia reported as nitrogen (NH3-N) to the same ammonia as NH3. */
export function nitrogenToAmmonia(mgLasN: number): number {
  return nonNegative(mgLasN, 'mgLasN', 'Ammonia (as N)') * NH3_PER_N
}

/** Ammonia reported as NH3 to the same ammonia as nitrogen (NH3-N). */
export function ammoniaToNitrogen(mgLasNH3: number): number {
  return nonNegative(mgLasNH3, 'mgLasNH3', 'Ammonia (as NH3)') / NH3_PER_N
}
