import { describe, expect, it } from 'vitest'
import type { ParameterEvaluation } from '../../shared/types/water'
import { adviceFor, callUsToday, PARAMETER_WORDS, trendOf } from '../../shared/utils/advice'
import { ACT_WORDS } from '../../shared/utils/water/evaluate'
import { foreignUnitsIn } from '../helpers/units-scan'

// The product's own wording rules (common practice, no source): what to do, which way it moves,
// when the company retests, and "call us" with the company's number for anything in the act band.
// The order and the KH rule are PRODUCT.md's "Advice that does no harm" (Emerson et al. 1975 for
// why KH waits while un-ionized ammonia is high).
const ev = (p: Partial<ParameterEvaluation> & Pick<ParameterEvaluation, 'parameter' | 'value' | 'status'>): ParameterEvaluation => ({ limit: null, reason: '', ...p })

describe('plain-words advice', () => {
  it('says which way a value moved since the test before (10 % counts as steady)', () => {
    expect(trendOf(0.5, 0.25)).toBe('rising')
    expect(trendOf(0.2, 0.5)).toBe('falling')
    expect(trendOf(7.5, 7.4)).toBe('steady')
    expect(trendOf(0.55, 0.5)).toBe('steady') // 9 % of 0.55
    expect(trendOf(0.56, 0.5)).toBe('rising') // 10.7 %
    expect(trendOf(0, 0)).toBe('steady')
    expect(trendOf(7.5, null)).toBeNull()
    expect(trendOf(undefined, 7.5)).toBeNull()
  })

  it('customer words come from the catalogue', () => {
    expect(PARAMETER_WORDS.nh3MgL).toBe('Free ammonia')
    expect(PARAMETER_WORDS.khMgL).toBe('KH (buffering)')
  })

  it('rising ammonia: bacteria, feeding advice, and the retest date', () => {
    const a = adviceFor([ev({ parameter: 'totalAmmoniaMgL', value: 0.5, status: 'watch', limit: 0.25 }), ev({ parameter: 'pH', value: 7.6, status: 'ok' })], { totalAmmoniaMgL: 0.25, pH: 7.6 }, '2027-06-02')
    expect(a.overall).toBe('watch')
    expect(a.callUs).toBe(false)
    expect(a.headline).toBe('Ammonia is rising: add beneficial bacteria and cut back feeding (see the feeding advice); we will retest on Wed, Jun 2.')
    expect(a.lines.map(l => l.key)).toEqual(['totalAmmoniaMgL', 'feeding', 'pH'])
    expect(a.lines[1]!.text).toMatch(/^Feed lightly, only what the fish eat in a few minutes/)
    expect(a.lines[1]!.status).toBe('watch')
    expect(a.lines[2]!.text).toBe('pH is fine.')
  })

  it('anything in the act band says to call the same day, with the number when there is one', () => {
    const chlorine = [ev({ parameter: 'chlorineMgL', value: 0.5, status: 'act', limit: 0 })]
    const a = adviceFor(chlorine, {}, null, { phone: '555-0142' })
    expect(a.callUs).toBe(true)
    expect(a.headline).toBe('Call us today on 555-0142. Chlorine is high: add dechlorinator for the whole pond; we will retest at the next visit.')
    expect(adviceFor(chlorine, {}, null).headline).toBe('Call your pond company today. Chlorine is high: add dechlorinator for the whole pond; we will retest at the next visit.')
    expect(adviceFor(chlorine, {}, null, { phone: '   ' }).headline).toMatch(/^Call your pond company today\./)
    expect(callUsToday('555-0142')).toBe('Call us today on 555-0142.')
    expect(callUsToday(null)).toBe('Call your pond company today.')
  })

  it('"call us" once, on the first thing to do; watch lines never use act words', () => {
    const a = adviceFor([
      ev({ parameter: 'khMgL', value: 60, status: 'watch', limit: 100 }),
      ev({ parameter: 'nitriteMgL', value: 0.5, status: 'act', limit: 0.25 }),
      ev({ parameter: 'dissolvedOxygenMgL', value: 5.5, status: 'watch', limit: 6 }),
    ], {}, null, { phone: '555-0142' })
    expect(a.lines.map(l => l.key)).toEqual(['dissolvedOxygenMgL', 'nitriteMgL', 'feeding', 'khMgL'])
    expect(a.lines.map(l => l.priority)).toEqual([1, 2, 2, 4])
    expect(a.lines.filter(l => l.text.includes('Call us today on 555-0142.'))).toHaveLength(1)
    expect(a.lines[1]!.text).toMatch(/^Call us today on 555-0142\. Nitrite is high/)
    expect(a.headline).toBe(a.lines[1]!.text)
    for (const l of a.lines.filter(x => x.status === 'watch')) expect(l.text).not.toMatch(ACT_WORDS)
  })

  it('a low result gets the low-side action; KH buffer only while ammonia is not high', () => {
    const a = adviceFor([ev({ parameter: 'khMgL', value: 40, status: 'watch', limit: 60 })], { khMgL: 41 }, null)
    expect(a.lines[0]!.text).toMatch(/^KH \(buffering\) is low: add a KH buffer/)
    const held = adviceFor([ev({ parameter: 'khMgL', value: 40, status: 'watch', limit: 60 })], {}, null, { computed: { nh3MgL: 0.03, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: null } })
    expect(held.lines.map(l => l.key)).toEqual(['feeding', 'khMgL'])
    expect(held.lines[1]!.text).toMatch(/^KH \(buffering\) is low: do not add a KH buffer yet.*KH comes once ammonia is down/)
    const pH = adviceFor([ev({ parameter: 'pH', value: 6.8, status: 'watch', limit: 7 }), ev({ parameter: 'nh3MgL', value: 0.03, status: 'watch', limit: 0.02 })], {}, null)
    expect(pH.lines.find(l => l.key === 'pH')!.text).toMatch(/do not add pH or KH products while ammonia is high/)
    // the feature's own watch level counts
    const own = adviceFor([ev({ parameter: 'khMgL', value: 40, status: 'watch', limit: 60 })], {}, null, { nh3WatchMgL: 0.05, computed: { nh3MgL: 0.03, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: null } })
    expect(own.lines.map(l => l.text)).toEqual(['KH (buffering) is low: add a KH buffer as the dosing helper works out; we will retest at the next visit.'])
  })

  it('aeration first when ammonia is high in warm water (common practice: about 25 °C / 77 °F and up)', () => {
    const evaluation = [
      ev({ parameter: 'temperatureC', value: 26, status: 'ok' }),
      ev({ parameter: 'totalAmmoniaMgL', value: 2, status: 'act', limit: 1 }),
    ]
    const us = adviceFor(evaluation, {}, null, { unitSystem: 'us', phone: '555-0142' })
    expect(us.lines[0]!.key).toBe('aeration')
    expect(us.lines[0]!.text).toMatch(/^Call us today on 555-0142\. Keep the water moving first.*Warm water \(78\.8 °F\)/)
    expect(adviceFor(evaluation, {}, null).lines[0]!.text).toMatch(/Warm water \(26 °C\)/)
    const cool = adviceFor([ev({ parameter: 'temperatureC', value: 20, status: 'ok' }), evaluation[1]!], {}, null)
    expect(cool.lines.map(l => l.key)).not.toContain('aeration')
  })

  it('feeding in cold water (common practice: lightly below about 10 °C / 50 °F, none below 5 °C / 41 °F)', () => {
    const at = (c: number, unitSystem: 'us' | 'metric' = 'metric') => adviceFor([ev({ parameter: 'temperatureC', value: c, status: 'ok' })], {}, null, { unitSystem }).lines.find(l => l.key === 'feeding')?.text
    expect(at(8)).toBe('Feed lightly, a few times a week: below about 10 °C fish eat and digest little.')
    expect(at(8, 'us')).toBe('Feed lightly, a few times a week: below about 50 °F fish eat and digest little.')
    expect(at(4, 'us')).toBe('Stop feeding until the water warms up: below about 41 °F fish cannot digest food.')
    expect(at(12)).toBeUndefined()
  })

  it('all in range, or no test yet; text in the system\'s units', () => {
    expect(adviceFor([ev({ parameter: 'pH', value: 7.5, status: 'ok' })], {}, null).headline).toBe('Everything we tested is in range.')
    expect(adviceFor([], {}, null).headline).toBe('No water test yet.')
    const a = adviceFor([ev({ parameter: 'temperatureC', value: 3, status: 'ok' }), ev({ parameter: 'nitriteMgL', value: 0.2, status: 'watch', limit: 0.1 })], {}, '2027-01-05', { unitSystem: 'us' })
    expect(foreignUnitsIn(a.lines.map(l => l.text), 'us')).toEqual([])
  })
})

describe('what a customer can do for each result (the product\'s advice, common practice, no source)', () => {
  const line = (parameter: ParameterEvaluation['parameter'], value: number, limit: number) =>
    adviceFor([ev({ parameter, value, status: 'watch', limit })], {}, null).lines.find(l => l.key === parameter)!.text
  it.each([
    ['totalAmmoniaMgL', 0.5, 0.25, /^Ammonia is high: add beneficial bacteria and cut back feeding/],
    ['nh3MgL', 0.03, 0.02, /^Free ammonia is high: this is the form of ammonia that harms fish/],
    ['nitriteMgL', 0.2, 0.1, /^Nitrite is high: add beneficial bacteria and cut back feeding/],
    ['nitrateMgL', 30, 20, /^Nitrate is high: change about a tenth of the water with dechlorinated water/],
    ['phosphateMgL', 1, 0.5, /^Phosphate is high: feed less and remove dead leaves/],
    ['pH', 8.7, 8.5, /^pH is high: do not add pH products yourself;/],
    ['pH', 6.8, 7, /^pH is low: do not add pH products yourself; a KH buffer steadies pH/],
    ['khMgL', 60, 100, /^KH \(buffering\) is low: add a KH buffer as the dosing helper works out/],
    ['dissolvedOxygenMgL', 5.5, 6, /^Oxygen is low: run the waterfall or an air pump day and night/],
    ['doSaturationPct', 60, 70, /^Oxygen is low: run the waterfall or an air pump day and night/],
    ['chlorineMgL', 0.1, 0, /^Chlorine is high: add dechlorinator for the whole pond/],
    ['temperatureC', 28, 27, /^Water temperature is high: shade part of the pond and keep the water moving/],
    ['temperatureC', 3, 4, /^Water temperature is low: feed less: fish eat little in cold water/],
    ['saltGL', 4, 3, /^Salt is high: add no more salt; only water changes lower it/],
    ['ghMgL', 400, 300, /^Hardness \(GH\) is high: keep an eye on the fish/],
  ] as const)('%s %d (limit %d)', (parameter, value, limit, want) => {
    expect(line(parameter, value, limit)).toMatch(want)
  })
  it('a trend replaces high or low, and an ok result says its trend', () => {
    const a = adviceFor([ev({ parameter: 'nitrateMgL', value: 30, status: 'watch', limit: 20 }), ev({ parameter: 'pH', value: 7.0, status: 'ok' })], { nitrateMgL: 40, pH: 7.8 }, null)
    expect(a.lines.map(l => l.text)).toEqual([
      'Nitrate is falling: change about a tenth of the water with dechlorinated water; we will retest at the next visit.',
      'pH is fine (falling).',
    ])
    expect(a.lines.map(l => l.trend)).toEqual(['falling', 'falling'])
    expect(adviceFor([ev({ parameter: 'pH', value: 7.9, status: 'ok' })], { pH: 7.0 }, null).lines[0]!.text).toBe('pH is fine (rising).')
    expect(adviceFor([ev({ parameter: 'pH', value: 7.5, status: 'ok' })], { pH: 7.5 }, null).lines[0]!.text).toBe('pH is fine.')
    expect(trendOf(10, 9)).toBe('rising') // exactly 10 % is no longer steady
  })
  it('order: by priority, then act before watch, then as tested; results in range last', () => {
    const a = adviceFor([
      ev({ parameter: 'pH', value: 7.5, status: 'ok' }),
      ev({ parameter: 'nitrateMgL', value: 30, status: 'watch', limit: 20 }),
      ev({ parameter: 'nitriteMgL', value: 0.2, status: 'watch', limit: 0.1 }),
      ev({ parameter: 'totalAmmoniaMgL', value: 2, status: 'act', limit: 1 }),
      ev({ parameter: 'chlorineMgL', value: 0.1, status: 'act', limit: 0 }),
      ev({ parameter: 'phosphateMgL', value: 1, status: 'watch', limit: 0.5 }),
    ], {}, null)
    expect(a.lines.map(l => l.key)).toEqual(['totalAmmoniaMgL', 'chlorineMgL', 'feeding', 'nitriteMgL', 'nitrateMgL', 'phosphateMgL', 'pH'])
    expect(a.lines.find(l => l.key === 'feeding')).toMatchObject({ status: 'act', priority: 2, parameter: 'totalAmmoniaMgL' })
  })
  it('un-ionized ammonia from the computed values alone (no line of its own) counts for aeration, feeding and KH', () => {
    const computed = (nh3MgL: number) => ({ nh3MgL, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: null })
    const warm = [ev({ parameter: 'temperatureC', value: 25, status: 'ok' }), ev({ parameter: 'khMgL', value: 60, status: 'watch', limit: 100 })]
    const high = adviceFor(warm, {}, null, { computed: computed(0.02) })
    expect(high.lines.map(l => l.key)).toEqual(['aeration', 'feeding', 'khMgL', 'temperatureC'])
    expect(high.lines[0]).toMatchObject({ status: 'watch', parameter: 'temperatureC' })
    expect(high.lines[1]).toMatchObject({ status: 'watch', priority: 2, parameter: 'nh3MgL' })
    expect(high.overall).toBe('watch')
    expect(high.lines[1]!.text).toMatch(/until ammonia and nitrite are back in range/)
    expect(high.lines[2]!.text).toMatch(/do not add a KH buffer yet/)
    const low = adviceFor(warm, {}, null, { computed: computed(0.019) })
    expect(low.lines.map(l => l.key)).toEqual(['khMgL', 'temperatureC'])
    // without a temperature line, the extra lines point at the ammonia
    const noTemp = adviceFor([], {}, null, { computed: computed(0.05) })
    expect(noTemp.lines).toEqual([expect.objectContaining({ key: 'feeding', parameter: 'nh3MgL', status: 'watch' })])
    expect(noTemp.headline).toBe(noTemp.lines[0]!.text)
    expect(adviceFor([ev({ parameter: 'temperatureC', value: 8, status: 'ok' })], {}, null).lines[1]).toMatchObject({ key: 'feeding', parameter: 'temperatureC', status: 'ok' })
  })
  it('warm water alone, or results in range, call for neither aeration nor feeding', () => {
    const fine = adviceFor([ev({ parameter: 'temperatureC', value: 26, status: 'ok' }), ev({ parameter: 'totalAmmoniaMgL', value: 0.1, status: 'ok' }), ev({ parameter: 'nitriteMgL', value: 0, status: 'ok' })], {}, null)
    expect(fine.lines.map(l => l.key)).toEqual(['temperatureC', 'totalAmmoniaMgL', 'nitriteMgL'])
    const cool = adviceFor([ev({ parameter: 'temperatureC', value: 24.9, status: 'ok' }), ev({ parameter: 'totalAmmoniaMgL', value: 2, status: 'act', limit: 1 })], {}, null)
    expect(cool.lines.map(l => l.key)).not.toContain('aeration')
    const warm = adviceFor([ev({ parameter: 'temperatureC', value: 25, status: 'ok' }), ev({ parameter: 'totalAmmoniaMgL', value: 0.5, status: 'watch', limit: 0.25 })], {}, null)
    expect(warm.lines[0]).toMatchObject({ key: 'aeration', status: 'watch', parameter: 'temperatureC' })
  })
  it('cold-water boundaries (common practice): 10 °C is not cold, 5 °C is cold but not too cold to feed lightly', () => {
    const feeding = (c: number) => adviceFor([ev({ parameter: 'temperatureC', value: c, status: 'ok' })], {}, null).lines.find(l => l.key === 'feeding')
    expect(feeding(10)).toBeUndefined()
    expect(feeding(9.9)!.text).toMatch(/^Feed lightly, a few times a week/)
    expect(feeding(5)!.text).toMatch(/^Feed lightly, a few times a week/)
    expect(feeding(4.9)!.text).toMatch(/^Stop feeding/)
    expect(feeding(5)).toMatchObject({ status: 'ok', priority: 5 })
  })
  it('an un-ionized ammonia line over the feature\'s own watch level holds KH back even under the 0.02 default', () => {
    const a = adviceFor([ev({ parameter: 'nh3MgL', value: 0.015, status: 'watch', limit: 0.01 }), ev({ parameter: 'khMgL', value: 60, status: 'watch', limit: 100 })], {}, null)
    expect(a.lines.find(l => l.key === 'khMgL')!.text).toMatch(/do not add a KH buffer yet/)
  })
})
