import { describe, expect, it } from 'vitest'

// Each module of the water engine and the advice builds its tables (range profiles, wording,
// catalogue) when it loads; a wrong table entry can make it throw right there. Importing inside a
// test turns that into a failing test rather than a test file that cannot load (which would
// report no tests at all).
describe('the water and advice modules load', () => {
  it.each([
    'ammonia', 'care-advice', 'dosing', 'errors', 'evaluate', 'format', 'oxygen', 'parameters', 'profiles', 'rules', 'units', 'validate', 'volume',
  ])('water/%s', async (name) => {
    const mod = await import(`../../../shared/utils/water/${name}.ts`)
    expect(Object.keys(mod).length).toBeGreaterThan(0)
  })
  it.each(['advice', 'home-dosing', 'water-chemistry'])('%s', async (name) => {
    const mod = await import(`../../../shared/utils/${name}.ts`)
    expect(Object.keys(mod).length).toBeGreaterThan(0)
  })
  it('the default profiles are complete', async () => {
    const { DEFAULT_PROFILES } = await import('../../../shared/utils/water/profiles')
    for (const profile of Object.values(DEFAULT_PROFILES)) {
      for (const r of Object.values(profile.ranges)) {
        for (const [bound, src] of Object.entries(r.boundSources ?? {})) {
          expect(typeof r[bound as 'target'], `${profile.key} ${bound}`).toBe('number')
          expect(src.source.length).toBeGreaterThan(5)
        }
      }
    }
  })
})
