import { describe, expect, it } from 'vitest'
import { isLegacyVisitRule, legacyRuleToVisitSchedule, seasonOfMonths, templateVisitSchedule } from '../../shared/schemas/visit-schedule'

describe('reading rules from before windows', () => {
  it('tells old rules from rhythms', () => {
    expect(isLegacyVisitRule('FREQ=WEEKLY;INTERVAL=2')).toBe(false)
    expect(isLegacyVisitRule('FREQ=YEARLY')).toBe(false)
    expect(isLegacyVisitRule('FREQ=WEEKLY;BYDAY=TU')).toBe(true)
  })

  it('a run of months is the season; a run across the new year wraps; no months is all year', () => {
    expect(seasonOfMonths([5, 6, 7, 8, 9])).toEqual({ from: '05-01', to: '09-30' })
    expect(seasonOfMonths([12, 1, 2, 3])).toEqual({ from: '12-01', to: '03-31' })
    expect(seasonOfMonths([2])).toEqual({ from: '02-01', to: '02-29' })
    expect(seasonOfMonths([])).toEqual({ from: '01-01', to: '12-31' })
    // Two runs: the season covers both, from the first run's start to the last run's end.
    expect(seasonOfMonths([4, 10, 11])).toEqual({ from: '04-01', to: '11-30' })
  })

  it('keeps FREQ and INTERVAL as the rhythm; a yearly rule is once in the season', () => {
    expect(legacyRuleToVisitSchedule('FREQ=YEARLY;BYMONTH=4;BYDAY=MO;BYSETPOS=2')).toEqual({ rrule: 'FREQ=YEARLY', from: '04-01', to: '04-30', toleranceDays: 0 })
    expect(legacyRuleToVisitSchedule('FREQ=WEEKLY;INTERVAL=2;BYMONTH=5,6,7,8,9;BYDAY=TU')).toEqual({ rrule: 'FREQ=WEEKLY;INTERVAL=2', from: '05-01', to: '09-30', toleranceDays: 0 })
    expect(templateVisitSchedule({ rrule: 'FREQ=MONTHLY', seasonFrom: '12-01', seasonTo: '02-29', toleranceDays: 7 })).toEqual({ rrule: 'FREQ=MONTHLY', from: '12-01', to: '02-29', toleranceDays: 7 })
  })
})
