import { describe, expect, it } from 'vitest'
import { windowStart } from '../../server/services/chart-data'

// The chart windows are whole company-local days, so a series kept for a day is the series of
// that day; the next day has another window (and another cache key).
describe('windowStart', () => {
  it('starts the year at the company\'s midnight 365 days back, whatever the daylight-saving state', () => {
    expect(windowStart('year', 'America/Chicago', '2027-07-04')!.toISOString()).toBe('2026-07-04T05:00:00.000Z')
    // Two days after the spring change (8 March 2026): midnight is daylight time (UTC-5).
    expect(windowStart('year', 'America/Chicago', '2027-03-10')!.toISOString()).toBe('2026-03-10T05:00:00.000Z')
    expect(windowStart('year', 'America/Chicago', '2027-01-15')!.toISOString()).toBe('2026-01-15T06:00:00.000Z')
    expect(windowStart('year', 'Pacific/Auckland', '2027-07-04')!.toISOString()).toBe('2026-07-03T12:00:00.000Z')
  })

  it('moves with the day: the next day\'s window starts a day later', () => {
    const a = windowStart('year', 'America/Chicago', '2027-07-04')!
    const b = windowStart('year', 'America/Chicago', '2027-07-05')!
    expect(b.getTime() - a.getTime()).toBe(86_400_000)
  })

  it('starts the season on 1 March of the current season in the company\'s zone, and all has no start', () => {
    expect(windowStart('season', 'America/Chicago', '2027-02-28')!.toISOString()).toBe('2026-03-01T06:00:00.000Z')
    expect(windowStart('season', 'America/Chicago', '2027-03-01')!.toISOString()).toBe('2027-03-01T06:00:00.000Z')
    expect(windowStart('season', 'Pacific/Auckland', '2027-12-31')!.toISOString()).toBe('2027-02-28T11:00:00.000Z')
    expect(windowStart('all', 'America/Chicago', '2027-07-04')).toBeNull()
  })
})
