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
    expect(held.lines[0]!.text).toMatch(/^KH \(buffering\) is low: do not add a KH buffer yet.*KH comes once ammonia is down/)
    const pH = adviceFor([ev({ parameter: 'pH', value: 6.8, status: 'watch', limit: 7 }), ev({ parameter: 'nh3MgL', value: 0.03, status: 'watch', limit: 0.02 })], {}, null)
    expect(pH.lines.find(l => l.key === 'pH')!.text).toMatch(/do not add pH or KH products while ammonia is high/)
    // the feature's own watch level counts
    const own = adviceFor([ev({ parameter: 'khMgL', value: 40, status: 'watch', limit: 60 })], {}, null, { nh3WatchMgL: 0.05, computed: { nh3MgL: 0.03, nh3AsNMgL: null, nh3Fraction: null, doSaturationMgL: null, doSaturationPct: null } })
    expect(own.lines[0]!.text).toMatch(/add a KH buffer as/)
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
