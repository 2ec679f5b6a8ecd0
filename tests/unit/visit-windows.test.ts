import { describe, expect, it } from 'vitest'
import {
  buildVisitSchedule, describeVisitSchedule, expandVisitSchedule, parseVisitSchedule, visitScheduleToForm, VisitScheduleError,
  type VisitScheduleForm,
} from '../../shared/utils/visit-windows'

// Fixed terms only: nothing here depends on today's date.
const YEAR_2027 = { start: '2027-01-01', end: '2027-12-31' }
const dayGap = (a: string, b: string) => (Date.parse(b) - Date.parse(a)) / 86_400_000

function fieldOf(fn: () => unknown): string | undefined {
  try {
    fn()
  }
  catch (err) {
    expect(err).toBeInstanceOf(VisitScheduleError)
    return (err as VisitScheduleError).field
  }
  return undefined
}

describe('visit windows: once in the season', () => {
  const april = buildVisitSchedule({ kind: 'once', from: '04-01', to: '04-30' })

  it('"once in April" is stored as a yearly rhythm over an April season', () => {
    expect(april).toEqual({ rrule: 'FREQ=YEARLY', from: '04-01', to: '04-30', toleranceDays: 0 })
  })

  it('"once in April" for a 2027 term gives one window, 1–30 April, preferring the middle', () => {
    expect(expandVisitSchedule(april, YEAR_2027)).toEqual([{ key: '2027-04-01', earliest: '2027-04-01', latest: '2027-04-30', preferred: '2027-04-15' }])
    expect(describeVisitSchedule(april)).toBe('Once in April')
  })

  it('a term that starts on 20 April keeps only the rest of April', () => {
    expect(expandVisitSchedule(april, { start: '2027-04-20', end: '2028-04-19' })).toEqual([
      { key: '2027-04-01', earliest: '2027-04-20', latest: '2027-04-30', preferred: '2027-04-25' },
      { key: '2028-04-01', earliest: '2028-04-01', latest: '2028-04-19', preferred: '2028-04-10' },
    ])
  })

  it('"once between 15 October and 15 November"', () => {
    const fall = buildVisitSchedule({ kind: 'once', from: '10-15', to: '11-15' })
    expect(expandVisitSchedule(fall, YEAR_2027)).toEqual([{ key: '2027-10-15', earliest: '2027-10-15', latest: '2027-11-15', preferred: '2027-10-30' }])
    expect(describeVisitSchedule(fall)).toBe('Once between 15 October and 15 November')
    expect(describeVisitSchedule(fall, { dateOrder: 'month-day' })).toBe('Once between October 15 and November 15')
  })

  it('the last day of February is the 28th in 2027 and the 29th in 2028', () => {
    const feb = buildVisitSchedule({ kind: 'once', from: '02-01', to: '02-29' })
    expect(describeVisitSchedule(feb)).toBe('Once in February')
    expect(expandVisitSchedule(feb, { start: '2027-01-01', end: '2028-12-31' }).map(w => w.latest)).toEqual(['2027-02-28', '2028-02-29'])
  })

  it('a season that covers the whole year reads "once a year"', () => {
    expect(describeVisitSchedule(buildVisitSchedule({ kind: 'once', from: '01-01', to: '12-31' }))).toBe('Once a year')
  })
})

describe('visit windows: a rhythm with a tolerance', () => {
  const fortnightly = buildVisitSchedule({ kind: 'every', interval: 2, unit: 'week', from: '05-01', to: '09-30', toleranceDays: 3 })

  it('"every 2 weeks from May to September, give or take 3 days" is stored as an RRULE plus a window', () => {
    expect(fortnightly).toEqual({ rrule: 'FREQ=WEEKLY;INTERVAL=2', from: '05-01', to: '09-30', toleranceDays: 3 })
    expect(describeVisitSchedule(fortnightly)).toBe('Every 2 weeks from May to September, give or take 3 days')
  })

  it('gives 11 windows in 2027, 14 days apart, each 3 days either side, clipped to the season', () => {
    const w = expandVisitSchedule(fortnightly, YEAR_2027)
    // 1 May + 14 k for k = 0 … 10 stays within 30 September (1 May + 140 days = 18 September).
    expect(w.map(x => x.preferred)).toEqual(['2027-05-01', '2027-05-15', '2027-05-29', '2027-06-12', '2027-06-26', '2027-07-10', '2027-07-24', '2027-08-07', '2027-08-21', '2027-09-04', '2027-09-18'])
    expect(w[0]).toEqual({ key: '2027-05-01', earliest: '2027-05-01', latest: '2027-05-04', preferred: '2027-05-01' })
    expect(w[1]).toEqual({ key: '2027-05-15', earliest: '2027-05-12', latest: '2027-05-18', preferred: '2027-05-15' })
    for (const x of w.slice(1)) {
      expect(dayGap(x.earliest, x.preferred)).toBe(3)
      expect(dayGap(x.preferred, x.latest)).toBe(3)
    }
    for (let i = 1; i < w.length; i++) expect(dayGap(w[i - 1]!.preferred, w[i]!.preferred)).toBe(14)
  })

  it('keeps windows inside the contract term: a term from 13 May to 31 August', () => {
    const w = expandVisitSchedule(fortnightly, { start: '2027-05-13', end: '2027-08-31' })
    // 1 May (window ends 4 May) is before the term; 4 September − 3 days = 1 September is after it.
    expect(w.map(x => x.key)).toEqual(['2027-05-15', '2027-05-29', '2027-06-12', '2027-06-26', '2027-07-10', '2027-07-24', '2027-08-07', '2027-08-21'])
    expect(w[0]).toEqual({ key: '2027-05-15', earliest: '2027-05-13', latest: '2027-05-18', preferred: '2027-05-15' })
    expect(w.every(x => x.earliest >= '2027-05-13' && x.latest <= '2027-08-31')).toBe(true)
  })

  it('"monthly test in winter" wraps the new year: December to February', () => {
    const winter = buildVisitSchedule({ kind: 'every', interval: 1, unit: 'month', from: '12-01', to: '02-28', toleranceDays: 7 })
    expect(winter.rrule).toBe('FREQ=MONTHLY')
    expect(describeVisitSchedule(winter)).toBe('Every month from December to February, give or take 7 days')
    // A term from March 2026 to February 2027 holds one winter: 1 Dec, 1 Jan, 1 Feb, each ± 7 days within the season.
    expect(expandVisitSchedule(winter, { start: '2026-03-01', end: '2027-02-28' })).toEqual([
      { key: '2026-12-01', earliest: '2026-12-01', latest: '2026-12-08', preferred: '2026-12-01' },
      { key: '2027-01-01', earliest: '2026-12-25', latest: '2027-01-08', preferred: '2027-01-01' },
      { key: '2027-02-01', earliest: '2027-01-25', latest: '2027-02-08', preferred: '2027-02-01' },
    ])
  })

  it('words other rhythms plainly', () => {
    expect(describeVisitSchedule(buildVisitSchedule({ kind: 'every', interval: 4, unit: 'week', from: '01-01', to: '12-31', toleranceDays: 0 }))).toBe('Every 4 weeks all year')
    expect(describeVisitSchedule(buildVisitSchedule({ kind: 'every', interval: 1, unit: 'week', from: '05-15', to: '09-20', toleranceDays: 1 }))).toBe('Every week from 15 May to 20 September, give or take 1 day')
    expect(describeVisitSchedule(buildVisitSchedule({ kind: 'every', interval: 3, unit: 'day', from: '06-01', to: '06-30' }))).toBe('Every 3 days in June')
  })

  it('the plan form round-trips through the stored form', () => {
    const forms: VisitScheduleForm[] = [
      { kind: 'once', from: '04-01', to: '04-30' },
      { kind: 'every', interval: 2, unit: 'week', from: '05-01', to: '09-30', toleranceDays: 3 },
      { kind: 'every', interval: 1, unit: 'month', from: '12-01', to: '02-28', toleranceDays: 7 },
    ]
    for (const f of forms) expect(visitScheduleToForm(buildVisitSchedule(f))).toEqual(f)
    expect(parseVisitSchedule({ rrule: 'rrule:freq=weekly;interval=2', from: '05-01', to: '09-30', toleranceDays: 3 })).toEqual({ rrule: 'FREQ=WEEKLY;INTERVAL=2', from: '05-01', to: '09-30', toleranceDays: 3 })
  })
})

describe('visit windows: bad input names the field', () => {
  it.each([
    ['from', () => buildVisitSchedule({ kind: 'once', from: '13-01', to: '04-30' })],
    ['to', () => buildVisitSchedule({ kind: 'once', from: '02-01', to: '02-30' })],
    ['to', () => buildVisitSchedule({ kind: 'once', from: '02-01', to: '2-3' })],
    ['interval', () => buildVisitSchedule({ kind: 'every', interval: 0, unit: 'week', from: '05-01', to: '09-30' })],
    ['unit', () => buildVisitSchedule({ kind: 'every', interval: 1, unit: 'year' as never, from: '05-01', to: '09-30' })],
    ['kind', () => buildVisitSchedule({ kind: 'sometimes', from: '05-01', to: '09-30' } as never)],
    // Weekly visits ± 4 days would overlap their neighbours: at most 3.
    ['toleranceDays', () => buildVisitSchedule({ kind: 'every', interval: 1, unit: 'week', from: '05-01', to: '09-30', toleranceDays: 4 })],
    ['toleranceDays', () => buildVisitSchedule({ kind: 'every', interval: 2, unit: 'week', from: '05-01', to: '09-30', toleranceDays: -1 })],
    ['rrule', () => parseVisitSchedule({ rrule: 'FREQ=WEEKLY;BYDAY=MO', from: '05-01', to: '09-30', toleranceDays: 0 })],
    ['rrule', () => parseVisitSchedule({ rrule: 'FREQ=HOURLY', from: '05-01', to: '09-30', toleranceDays: 0 })],
    ['toleranceDays', () => parseVisitSchedule({ rrule: 'FREQ=YEARLY', from: '04-01', to: '04-30', toleranceDays: 3 })],
    ['term.end', () => expandVisitSchedule(buildVisitSchedule({ kind: 'once', from: '04-01', to: '04-30' }), { start: '2027-05-01', end: '2027-04-01' })],
    ['term.start', () => expandVisitSchedule(buildVisitSchedule({ kind: 'once', from: '04-01', to: '04-30' }), { start: '2027-02-30', end: '2027-04-01' })],
  ])('%s', (field, fn) => {
    expect(fieldOf(fn)).toBe(field)
  })

  it('the message says what to enter', () => {
    expect(() => buildVisitSchedule({ kind: 'every', interval: 1, unit: 'week', from: '05-01', to: '09-30', toleranceDays: 4 })).toThrow(/less than half the gap between visits \(7 days\): at most 3/)
  })
})
