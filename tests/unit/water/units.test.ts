import fc from 'fast-check'
import { unit } from 'mathjs'
import { describe, expect, it } from 'vitest'
import {
  celsiusToFahrenheit, CUBIC_FOOT_L, cubicFeetToLitres, dkhToMgLCaCO3, fahrenheitToCelsius, feetToMetres, gramsToPounds,
  IMPERIAL_GALLON_L, imperialGallonsToLitres, inchesToMm, kgToPounds, litresPerHourToUsGph, litresToCubicFeet,
  litresToImperialGallons, litresToUsGallons, MEQ_L_PER_DKH, metresToFeet, MG_L_CACO3_PER_DKH, mgLCaCO3ToDkh, mmToInches,
  percentToPpt, poundsToKg, pptToPercent, squareFeetToSquareMetres, squareMetresToSquareFeet, US_GALLON_L,
  usGallonsToLitres, usGphToLitresPerHour, WaterInputError,
} from '../../../shared/utils/water-chemistry'

const relClose = (a: number, b: number, rel: number) => {
  const scale = Math.max(Math.abs(a), Math.abs(b), 1e-300)
  expect(Math.abs(a - b) / scale).toBeLessThanOrEqual(rel)
}

describe('exact definitions — NIST Handbook 44, Appendix C; UK Weights and Measures Act 1985 (P/C, 1e-9 relative)', () => {
  it('1 US gallon = 231 in³ with 1 in = 2.54 cm → 3.785411784 L (NIST HB 44)', () => {
    const fromInches = (231 * 2.54 ** 3) / 1000
    relClose(US_GALLON_L, 3.785411784, 1e-9)
    relClose(fromInches, US_GALLON_L, 1e-9)
    relClose(usGallonsToLitres(1), 3.785411784, 1e-9)
    relClose(litresToUsGallons(3.785411784), 1, 1e-9)
  })
  it('1 ft³ = 1728/231 = 7.480519… US gal = 28.316846592 L (NIST HB 44)', () => {
    relClose(CUBIC_FOOT_L, 28.316846592, 1e-9)
    relClose(cubicFeetToLitres(1), 28.316846592, 1e-9)
    relClose(litresToUsGallons(cubicFeetToLitres(1)), 1728 / 231, 1e-9)
    relClose(1728 / 231, 7.480519480519, 1e-9)
    relClose(litresToCubicFeet(28.316846592), 1, 1e-9)
  })
  it('imperial gallon = 4.54609 L exactly (UK Weights and Measures Act 1985)', () => {
    relClose(IMPERIAL_GALLON_L, 4.54609, 1e-9)
    relClose(litresToImperialGallons(4.54609), 1, 1e-9)
    relClose(imperialGallonsToLitres(1), 4.54609, 1e-9)
  })
  it('1 mg/L in 1000 US gal = 3.7854 g = 0.0083454 lb (C)', () => {
    const grams = (1 * usGallonsToLitres(1000)) / 1000
    expect(grams).toBeCloseTo(3.7854, 4)
    expect(gramsToPounds(grams)).toBeCloseTo(0.0083454, 7)
  })
  it('feet, inches, pounds, square feet (NIST HB 44)', () => {
    expect(feetToMetres(1)).toBe(0.3048)
    expect(inchesToMm(1)).toBeCloseTo(25.4, 12)
    expect(kgToPounds(0.45359237)).toBeCloseTo(1, 12)
    expect(poundsToKg(1)).toBeCloseTo(0.45359237, 12)
    expect(squareFeetToSquareMetres(1)).toBeCloseTo(0.09290304, 14)
    expect(celsiusToFahrenheit(100)).toBeCloseTo(212, 12)
    expect(fahrenheitToCelsius(32)).toBeCloseTo(0, 12)
  })
})

describe('KH units (P/C)', () => {
  it('1 °dH = 10 mg/L CaO → 1 dKH = 17.848 mg/L as CaCO3 = 0.35665 meq/L (from M(CaCO3)=100.0869, M(CaO)=56.0774)', () => {
    expect(MG_L_CACO3_PER_DKH).toBeCloseTo((10 * 100.0869) / 56.0774, 12)
    expect(MG_L_CACO3_PER_DKH).toBeCloseTo(17.848, 3)
    expect(MEQ_L_PER_DKH).toBeCloseTo(0.35665, 5)
    expect(dkhToMgLCaCO3(1)).toBeCloseTo(17.848, 3)
    expect(mgLCaCO3ToDkh(17.848)).toBeCloseTo(1, 4)
  })
})

describe('salt units (C)', () => {
  it('0.1 % (w/v) = 1 ppt = 1 g/L', () => {
    expect(pptToPercent(1)).toBeCloseTo(0.1, 12)
    expect(percentToPpt(0.1)).toBeCloseTo(1, 12)
  })
})

describe('unit conversions against mathjs as an independent oracle (fast-check)', () => {
  const x = fc.double({ min: -1e6, max: 1e6, noNaN: true })
  const pos = fc.double({ min: 0, max: 1e7, noNaN: true })
  const REL = 1e-12
  const near = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(REL * Math.max(1, Math.abs(b)))

  it('litres ↔ US gallons', () => {
    fc.assert(fc.property(pos, (v) => {
      near(litresToUsGallons(v), unit(v, 'L').toNumber('gal'))
      near(usGallonsToLitres(v), unit(v, 'gal').toNumber('L'))
    }))
  })
  it('feet ↔ metres', () => {
    fc.assert(fc.property(x, (v) => {
      near(feetToMetres(v), unit(v, 'ft').toNumber('m'))
      near(metresToFeet(v), unit(v, 'm').toNumber('ft'))
    }))
  })
  it('inches ↔ millimetres', () => {
    fc.assert(fc.property(x, (v) => {
      near(inchesToMm(v), unit(v, 'in').toNumber('mm'))
      near(mmToInches(v), unit(v, 'mm').toNumber('in'))
    }))
  })
  it('°F ↔ °C', () => {
    fc.assert(fc.property(fc.double({ min: -100, max: 200, noNaN: true }), (v) => {
      expect(celsiusToFahrenheit(v)).toBeCloseTo(unit(v, 'degC').toNumber('degF'), 9)
      expect(fahrenheitToCelsius(v)).toBeCloseTo(unit(v, 'degF').toNumber('degC'), 9)
    }))
  })
  it('cubic feet → litres', () => {
    fc.assert(fc.property(pos, (v) => {
      near(cubicFeetToLitres(v), unit(v, 'ft^3').toNumber('L'))
      near(litresToCubicFeet(v), unit(v, 'L').toNumber('cuft'))
    }))
  })
  it('square metres → square feet', () => {
    fc.assert(fc.property(pos, (v) => {
      near(squareMetresToSquareFeet(v), unit(v, 'm^2').toNumber('ft^2'))
    }))
  })
  it('grams / kilograms → pounds', () => {
    fc.assert(fc.property(pos, (v) => {
      near(gramsToPounds(v), unit(v, 'g').toNumber('lb'))
      near(kgToPounds(v), unit(v, 'kg').toNumber('lb'))
    }))
  })
  it('L/h ↔ US gal/h', () => {
    fc.assert(fc.property(pos, (v) => {
      near(litresPerHourToUsGph(v), unit(v, 'L/h').toNumber('gal/h'))
      near(usGphToLitresPerHour(v), unit(v, 'gal/h').toNumber('L/h'))
    }))
  })
  it('round trips', () => {
    fc.assert(fc.property(x, (v) => {
      near(metresToFeet(feetToMetres(v)), v)
      near(fahrenheitToCelsius(celsiusToFahrenheit(v)), v)
      near(mgLCaCO3ToDkh(dkhToMgLCaCO3(v)), v)
      near(percentToPpt(pptToPercent(v)), v)
    }))
  })
})

describe('non-finite input', () => {
  it('throws WaterInputError, never returns NaN', () => {
    expect(() => litresToUsGallons(Number.NaN)).toThrow(WaterInputError)
    expect(() => feetToMetres(Number.POSITIVE_INFINITY)).toThrow(WaterInputError)
    expect(() => celsiusToFahrenheit('20' as unknown as number)).toThrow(WaterInputError)
  })
})
