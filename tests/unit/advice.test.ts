import { describe, expect, it } from 'vitest'
import type { ParameterEvaluation } from '../../shared/types/water'
import { adviceFor, trendOf } from '../../shared/utils/advice'

// The product's own wording rules (common practice, no source): what to do, which way it moves,
// when the company retests, and "call us" for anything in the act band.
const ev = (p: Partial<ParameterEvaluation> & Pick<ParameterEvaluation, 'parameter' | 'value' | 'status'>): ParameterEvaluation => ({ limit: null, reason: '', ...p })

describe('plain-words advice', () => {
  it('says which way a value moved since the test before (10 % counts as steady)', () => {
    expect(trendOf(0.5, 0.25)).toBe('rising')
    expect(trendOf(0.2, 0.5)).toBe('falling')
    expect(trendOf(7.5, 7.4)).toBe('steady')
    expect(trendOf(7.5, null)).toBeNull()
  })

  it('rising ammonia: feed lightly, add bacteria, and the retest date', () => {
    const a = adviceFor([ev({ parameter: 'totalAmmoniaMgL', value: 0.5, status: 'watch', limit: 0.25 }), ev({ parameter: 'pH', value: 7.6, status: 'ok' })], { totalAmmoniaMgL: 0.25, pH: 7.6 }, '2027-06-02')
    expect(a.overall).toBe('watch')
    expect(a.callUs).toBe(false)
    expect(a.headline).toBe('Ammonia is rising: feed lightly (or not at all for a day or two) and add beneficial bacteria; we will retest on Wed, Jun 2.')
    expect(a.lines[1]!.text).toBe('pH is fine.')
  })

  it('anything in the act band says to call the same day', () => {
    const a = adviceFor([ev({ parameter: 'chlorineMgL', value: 0.5, status: 'act', limit: 0 })], {}, null)
    expect(a.callUs).toBe(true)
    expect(a.headline).toBe('Call us today. Chlorine is high: add dechlorinator for the whole pond now; we will retest at the next visit.')
  })

  it('a low result gets the low-side action', () => {
    const a = adviceFor([ev({ parameter: 'khMgL', value: 40, status: 'watch', limit: 60 })], { khMgL: 41 }, null)
    expect(a.lines[0]!.text).toMatch(/^KH \(buffering\) is low: add a KH buffer/)
  })

  it('all in range, or no test yet', () => {
    expect(adviceFor([ev({ parameter: 'pH', value: 7.5, status: 'ok' })], {}, null).headline).toBe('Everything we tested is in range.')
    expect(adviceFor([], {}, null).headline).toBe('No water test yet.')
  })
})
