// Unit conversions. Exact definitions: NIST Handbook 44, Appendix C (1 in = 2.54 cm,
// 1 US gal = 231 in³, 1 lb = 0.45359237 kg); UK Weights and Measures Act 1985 (imperial gallon).
import { finite } from './validate'

/** 1 inch = 0.0254 m exactly. */
export const INCH_M = 0.0254
/** 1 foot = 0.3048 m exactly. */
export const FOOT_M = 0.3048
/** 1 US gallon = 231 in³ = 3.785411784 L exactly. */
export const US_GALLON_L = 3.785411784
/** 1 imperial gallon = 4.54609 L exactly. */
export const IMPERIAL_GALLON_L = 4.54609
/** 1 ft³ = 0.3048³ m³ = 28.316846592 L exactly (= 1728/231 US gal). */
export const CUBIC_FOOT_L = 28.316846592
/** 1 ft² = 0.09290304 m² exactly. */
export const SQUARE_FOOT_M2 = 0.09290304
/** 1 lb (avoirdupois) = 453.59237 g exactly. */
export const POUND_G = 453.59237

/** Molar masses, g/mol (IUPAC conventional atomic weights). */
export const MOLAR_MASS = {
  CaCO3: 100.0869,
  CaO: 56.0774,
  NaHCO3: 84.006,
  NaCl: 22.98977 + 35.45,
  Cl: 35.45,
  Cl2: 2 * 35.45,
  N: 14.007,
  NH3: 17.031,
} as const

/**
 * 1 dKH (German degree) = 10 mg/L CaO-equivalent, expressed as CaCO3:
 * 10 × M(CaCO3) / M(CaO) = 17.848 mg/L as CaCO3.
 */
export const MG_L_CACO3_PER_DKH = (10 * MOLAR_MASS.CaCO3) / MOLAR_MASS.CaO
/** Equivalent weight of CaCO3 (two equivalents per mol), g/eq. */
export const CACO3_EQUIVALENT_WEIGHT = MOLAR_MASS.CaCO3 / 2
/** 1 dKH in meq/L. */
export const MEQ_L_PER_DKH = MG_L_CACO3_PER_DKH / CACO3_EQUIVALENT_WEIGHT

const n = (v: number, field = 'value') => finite(v, field)

export const litresToUsGallons = (litres: number): number => n(litres, 'litres') / US_GALLON_L
export const usGallonsToLitres = (gallons: number): number => n(gallons, 'gallons') * US_GALLON_L
export const litresToImperialGallons = (litres: number): number => n(litres, 'litres') / IMPERIAL_GALLON_L
export const imperialGallonsToLitres = (gallons: number): number => n(gallons, 'gallons') * IMPERIAL_GALLON_L
export const feetToMetres = (feet: number): number => n(feet, 'feet') * FOOT_M
export const metresToFeet = (metres: number): number => n(metres, 'metres') / FOOT_M
export const inchesToMm = (inches: number): number => n(inches, 'inches') * INCH_M * 1000
export const mmToInches = (mm: number): number => n(mm, 'mm') / (INCH_M * 1000)
export const celsiusToFahrenheit = (c: number): number => (n(c, 'celsius') * 9) / 5 + 32
export const fahrenheitToCelsius = (f: number): number => ((n(f, 'fahrenheit') - 32) * 5) / 9
export const cubicFeetToLitres = (cubicFeet: number): number => n(cubicFeet, 'cubicFeet') * CUBIC_FOOT_L
export const litresToCubicFeet = (litres: number): number => n(litres, 'litres') / CUBIC_FOOT_L
export const squareMetresToSquareFeet = (m2: number): number => n(m2, 'squareMetres') / SQUARE_FOOT_M2
export const squareFeetToSquareMetres = (ft2: number): number => n(ft2, 'squareFeet') * SQUARE_FOOT_M2
export const dkhToMgLCaCO3 = (dkh: number): number => n(dkh, 'dKH') * MG_L_CACO3_PER_DKH
export const mgLCaCO3ToDkh = (mgL: number): number => n(mgL, 'mgL') / MG_L_CACO3_PER_DKH
/** Parts per thousand (g/L, w/v) to percent: 1 ppt = 0.1 %. */
export const pptToPercent = (ppt: number): number => n(ppt, 'ppt') / 10
export const percentToPpt = (percent: number): number => n(percent, 'percent') * 10
export const gramsToPounds = (grams: number): number => n(grams, 'grams') / POUND_G
export const kgToPounds = (kg: number): number => (n(kg, 'kg') * 1000) / POUND_G
export const poundsToKg = (pounds: number): number => (n(pounds, 'pounds') * POUND_G) / 1000
export const litresPerHourToUsGph = (lph: number): number => n(lph, 'litresPerHour') / US_GALLON_L
export const usGphToLitresPerHour = (gph: number): number => n(gph, 'gallonsPerHour') * US_GALLON_L

/** Mass fraction of chloride in sodium chloride: M(Cl) / M(NaCl) = 0.6066. */
export const CHLORIDE_MASS_FRACTION_NACL = MOLAR_MASS.Cl / MOLAR_MASS.NaCl

/** Chloride, mg/L, from a salt (NaCl) reading in g/L. */
export const saltGLToChlorideMgL = (saltGL: number): number => n(saltGL, 'saltGL') * 1000 * CHLORIDE_MASS_FRACTION_NACL
