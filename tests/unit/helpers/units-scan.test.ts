import { describe, expect, it } from 'vitest'
import { foreignUnits, foreignUnitsIn, stringsIn } from '../../helpers/units-scan'

// The scanner the unit tests (and the server's e-mail and PDF tests) use to check that a sentence
// speaks only its company's units. Its rules are the product's (PRODUCT.md "Words"), no source.
describe('units scan', () => {
  it('finds metric units in a US sentence', () => {
    expect(foreignUnits('Water temperature 26 °C is warm', 'us')).toEqual(['°C'])
    expect(foreignUnits('change 8,200 L of water, then 5L more', 'us')).toEqual(['L', 'L'])
    expect(foreignUnits('add 205 g, or 1.2 kg, of salt', 'us')).toEqual(['g', 'kg'])
    expect(foreignUnits('add 15 mL per 400 litres', 'us')).toEqual(['mL', 'litres'])
    expect(foreignUnits('a shelf 30 cm deep, 2.5 m long, 12 mm of rain, 4 m² of surface', 'us')).toEqual(['cm', 'm', 'mm', 'm²'])
    expect(foreignUnits('salt 3 g/L', 'us')).toEqual(['g/L'])
    expect(foreignUnits('a pump of 4,000 L/h', 'us')).toEqual(['L/h'])
    expect(foreignUnits('keep it below 10 degrees Celsius', 'us')).toEqual(['degrees Celsius'])
  })

  it('finds US units in a metric sentence', () => {
    expect(foreignUnits('Water temperature 78.8 °F is warm', 'metric')).toEqual(['°F'])
    expect(foreignUnits('change 2,170 US gal, or 100 gallons', 'metric')).toEqual(['US gal', 'gallons'])
    expect(foreignUnits('add 7 oz or 2.7 lb, or 0.2 fl oz', 'metric')).toEqual(['oz', 'lb', 'fl oz'])
    expect(foreignUnits('a shelf 12 in deep and 6 ft long, 40 ft² of surface', 'metric')).toEqual(['in', 'ft', 'ft²'])
    expect(foreignUnits('about 3 pounds of salt', 'metric')).toEqual(['pounds'])
    expect(foreignUnits('a pump of 1,000 US gal/h', 'metric')).toEqual(['US gal/h'])
  })

  it('leaves concentrations, percentages and words alone', () => {
    const neutral = [
      'Total ammonia 2 mg/L as N is above 0.25',
      'raise chloride to at least 10 × nitrite (5 mg/L) (SRAC 462)',
      'salt 0.3 % is a standing level; 3 ppt is the same',
      'Raise KH by no more than about 1 dKH (18 mg/L) a day',
      'pH 8.2 is within 7.0–8.5; air pressure 95 kPa',
      'Fish live in the pond; a top-up meter reading; 1 in 10 fish',
      'Keep the water moving, and feed lightly in the mornings',
      'Let the lid down; Go left; Mix nothing',
      'Call us today on 555-0142.',
    ]
    for (const text of neutral) {
      expect(foreignUnits(text, 'us'), text).toEqual([])
      expect(foreignUnits(text, 'metric'), text).toEqual([])
    }
  })

  it('a sentence in its own system passes', () => {
    expect(foreignUnits('change 8,200 L; add 205 g; 26 °C; 30 cm', 'metric')).toEqual([])
    expect(foreignUnits('change 2,170 US gal; add 7 oz; 78.8 °F; 12 in', 'us')).toEqual([])
  })

  it('collects every string of a nested value, and reports only the failing ones', () => {
    const value = { reason: 'add 5 g', amount: 5, cautions: ['dissolve it', 'at 26 °C'], inputs: { unit: 'g' } }
    expect(stringsIn(value, new Set(['inputs']))).toEqual(['add 5 g', 'dissolve it', 'at 26 °C'])
    expect(foreignUnitsIn(stringsIn(value, new Set(['inputs'])), 'us')).toEqual([
      { text: 'add 5 g', units: ['g'] },
      { text: 'at 26 °C', units: ['°C'] },
    ])
  })
})
