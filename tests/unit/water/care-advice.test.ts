import { describe, expect, it } from 'vitest'
import { aerationAdvice, feedingAdvice, khAfterAmmoniaAdvice, warmAndAmmonia, type WaterState } from '../../../shared/utils/water/care-advice'
import { ELECTRICAL_CAUTION } from '../../../shared/utils/water/rules'

// Advice without an amount (PRODUCT.md "Advice that does no harm"): the thresholds are common
// practice, no source (aeration in warm water from about 25 °C, feeding lightly below about 10 °C
// and none below about 5 °C); why KH waits is Emerson et al. (1975).
const calm: WaterState = {
  temperatureC: null, dissolvedOxygenMgL: null, doLowMgL: 6, doSaturationPct: null, doSaturationLowPct: 70,
  nh3MgL: null, nh3WatchMgL: 0.02, ammoniaHigh: false, nitriteHigh: false, ammoniaOrNitriteAct: false,
}
const w = (s: Partial<WaterState>): WaterState => ({ ...calm, ...s })

describe('aeration', () => {
  it('none for calm water; oxygen exactly at its low level is not low', () => {
    expect(aerationAdvice(calm, 'metric')).toBeNull()
    expect(aerationAdvice(w({ dissolvedOxygenMgL: 6, doSaturationPct: 70, temperatureC: 20 }), 'metric')).toBeNull()
    expect(aerationAdvice(w({ dissolvedOxygenMgL: 4, doLowMgL: null }), 'metric')).toBeNull()
    expect(aerationAdvice(w({ doSaturationPct: 40, doSaturationLowPct: null }), 'metric')).toBeNull()
  })
  it('every reason at once, joined, with the inputs it came from', () => {
    const s = aerationAdvice(w({ temperatureC: 28, dissolvedOxygenMgL: 4.5, doSaturationPct: 57.4, nh3MgL: 0.03 }), 'us')!
    expect(s.reason).toBe('Dissolved oxygen 4.5 mg/L is below 6; oxygen saturation 57 % is below 70 %; the water is warm (82.4 °F) and ammonia is high: warm water holds less oxygen while fish and the filter\'s bacteria need more. Aerate first, before any other treatment: run an air pump or the waterfall day and night (oxygen is lowest just before dawn)')
    expect(s).toMatchObject({ key: 'aeration', product: 'aeration (air pump, waterfall or fountain)', amount: null, unit: '', amountText: null, priority: 1 })
    expect(s.inputs).toEqual({ temperatureC: 28, dissolvedOxygenMgL: 4.5, doSaturationPct: 57.4, nh3MgL: 0.03 })
    expect(s.cautions).toEqual(['Do not turn off the pump or the aerator at night', ELECTRICAL_CAUTION])
    expect(aerationAdvice(w({ dissolvedOxygenMgL: 4.5 }), 'metric')!.inputs).toEqual({ dissolvedOxygenMgL: 4.5 })
  })
  it('warm and ammonia: from 25 °C, with NH3 at (not only above) its watch level or total ammonia high', () => {
    expect(warmAndAmmonia(w({ temperatureC: 25, nh3MgL: 0.02 }))).toBe(true)
    expect(warmAndAmmonia(w({ temperatureC: 25, nh3MgL: 0.0199 }))).toBe(false)
    expect(warmAndAmmonia(w({ temperatureC: 24.9, nh3MgL: 0.5 }))).toBe(false)
    expect(warmAndAmmonia(w({ temperatureC: 30, ammoniaHigh: true }))).toBe(true)
    expect(warmAndAmmonia(w({ temperatureC: 30 }))).toBe(false)
    expect(warmAndAmmonia(w({ temperatureC: null, ammoniaHigh: true }))).toBe(false)
  })
})

describe('feeding', () => {
  it('none for calm water above 10 °C', () => {
    expect(feedingAdvice(w({ temperatureC: 10 }), 'metric')).toBeNull()
    expect(feedingAdvice(calm, 'metric')).toBeNull()
  })
  it('which of ammonia and nitrite, in words that agree', () => {
    expect(feedingAdvice(w({ nitriteHigh: true }), 'metric')!.reason).toBe('Nitrite is above the watch level: feed lightly (only what is eaten in a few minutes) until it is back in range (common practice)')
    expect(feedingAdvice(w({ ammoniaHigh: true }), 'metric')!.reason).toBe('Ammonia is above the watch level: feed lightly (only what is eaten in a few minutes) until it is back in range (common practice)')
    expect(feedingAdvice(w({ nh3MgL: 0.02 }), 'metric')!.reason).toMatch(/^Ammonia is above the watch level/)
    expect(feedingAdvice(w({ nh3MgL: 0.019 }), 'metric')).toBeNull()
    expect(feedingAdvice(w({ ammoniaHigh: true, nitriteHigh: true, ammoniaOrNitriteAct: true }), 'metric')!.reason).toBe('Ammonia and nitrite are high: stop feeding for a day or two, then feed lightly (only what is eaten in a few minutes) until they are back in range (common practice)')
    expect(feedingAdvice(w({ nitriteHigh: true, ammoniaOrNitriteAct: true }), 'metric')!.reason).toMatch(/until it is back in range/)
  })
  it('cold and toxic together: both, the temperature first; its inputs and caution', () => {
    const s = feedingAdvice(w({ temperatureC: 4, nitriteHigh: true, nh3MgL: 0.001 }), 'metric')!
    expect(s.reason).toBe('The water is 4 °C, below about 5 °C: stop feeding until it warms up; fish cannot digest food this cold. Nitrite is above the watch level: feed lightly (only what is eaten in a few minutes) until it is back in range (common practice)')
    expect(s).toMatchObject({ key: 'feeding', product: 'feeding', amount: null, amountText: null, priority: 2 })
    expect(s.inputs).toEqual({ temperatureC: 4, nh3MgL: 0.001, feedLightlyBelowC: 10, stopFeedingBelowC: 5 })
    expect(s.cautions).toEqual(['Remove food that is not eaten within a few minutes'])
    expect(feedingAdvice(w({ temperatureC: 5 }), 'us')!.reason).toBe('The water is 41 °F, below about 50 °F: feed lightly, a few times a week, with an easily digested food (common practice)')
    expect(feedingAdvice(w({ nitriteHigh: true }), 'metric')!.inputs).toEqual({ feedLightlyBelowC: 10, stopFeedingBelowC: 5 })
  })
})

describe('KH once ammonia is down (Emerson et al. 1975)', () => {
  it('with the un-ionized ammonia, or with only total ammonia known', () => {
    const s = khAfterAmmoniaAdvice({ khMgL: 90, targetKhMgL: 120, nh3MgL: 0.2141, nh3WatchMgL: 0.02 }, 'us')
    expect(s.reason).toBe('KH 90 mg/L is below the target of 120, but do not raise it yet: un-ionized ammonia 0.214 mg/L is at or above its watch level of 0.02, and a KH buffer raises pH, which makes more of the ammonia toxic (Emerson et al. 1975). Raise KH once ammonia is down')
    expect(s).toMatchObject({ key: 'kh_after_ammonia', product: 'sodium bicarbonate (KH buffer), later', amount: null, unit: '', amountText: null, priority: 4 })
    expect(s.inputs).toEqual({ khMgL: 90, targetKhMgL: 120, nh3WatchMgL: 0.02, nh3MgL: 0.2141 })
    expect(s.cautions).toEqual(['Add no pH or KH products until ammonia is down; retest ammonia, pH and KH after each water change'])
    const tan = khAfterAmmoniaAdvice({ khMgL: 90, targetKhMgL: 120, nh3MgL: null, nh3WatchMgL: 0.02 }, 'metric')
    expect(tan.reason).toMatch(/but do not raise it yet: total ammonia is high, and a KH buffer raises pH/)
    expect(tan.inputs).toEqual({ khMgL: 90, targetKhMgL: 120, nh3WatchMgL: 0.02 })
  })
})
