import { describe, expect, it } from 'vitest'
import {
  addDays, addMonths, formatInstant, formatLocalDate, isoWeekday, localDateOf, localToday, monthGridDays, monthName, weekDays, weekStart,
} from '../../shared/utils/company-time'

// Fixed instants only: nothing here reads the machine's clock.
describe("the company's today", () => {
  it('is still today in Chicago late in the evening when UTC is already tomorrow', () => {
    const now = new Date('2026-03-05T04:30:00Z') // 22:30 CST on 4 March
    expect(localToday('America/Chicago', now)).toBe('2026-03-04')
    expect(localToday('UTC', now)).toBe('2026-03-05')
  })
  it('is already tomorrow east of UTC', () => {
    expect(localToday('Pacific/Auckland', new Date('2026-03-04T12:00:00Z'))).toBe('2026-03-05')
  })
  it('follows the spring daylight-saving change in Chicago (UTC−6 before, UTC−5 after)', () => {
    // DST began 2026-03-08 at 02:00 local (US rule: second Sunday in March).
    expect(localToday('America/Chicago', new Date('2026-03-08T05:59:00Z'))).toBe('2026-03-07') // 23:59 CST
    expect(localToday('America/Chicago', new Date('2026-03-08T06:00:00Z'))).toBe('2026-03-08') // 00:00 CST
    expect(localToday('America/Chicago', new Date('2026-03-09T04:59:00Z'))).toBe('2026-03-08') // 23:59 CDT
    expect(localToday('America/Chicago', new Date('2026-03-09T05:00:00Z'))).toBe('2026-03-09') // 00:00 CDT
  })
  it('gives the local date of an instant', () => {
    expect(localDateOf('2026-11-01T05:30:00Z', 'America/Chicago')).toBe('2026-11-01') // 00:30 CDT, DST ends 02:00 local that day
    expect(localDateOf('2026-11-01T04:30:00Z', 'America/Chicago')).toBe('2026-10-31')
  })
})

describe('calendar arithmetic on local dates', () => {
  it('adds days across month ends, leap days and the daylight-saving weekend without drifting', () => {
    expect(addDays('2026-03-07', 1)).toBe('2026-03-08')
    expect(addDays('2026-03-08', 1)).toBe('2026-03-09')
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29')
    expect(addDays('2026-12-31', 1)).toBe('2027-01-01')
    expect(addDays('2026-01-01', -1)).toBe('2025-12-31')
    expect(addMonths('2026-01-31', 1)).toBe('2026-02-28')
  })
  it('numbers weekdays the ISO way and starts weeks on Monday', () => {
    expect(isoWeekday('2026-03-04')).toBe(3) // a Wednesday
    expect(isoWeekday('2026-03-08')).toBe(7) // a Sunday
    expect(weekStart('2026-03-04')).toBe('2026-03-02')
    expect(weekStart('2026-03-08')).toBe('2026-03-02')
    expect(weekStart('2026-03-09')).toBe('2026-03-09')
    expect(weekDays('2026-03-04')).toEqual(['2026-03-02', '2026-03-03', '2026-03-04', '2026-03-05', '2026-03-06', '2026-03-07', '2026-03-08'])
  })
  it('covers a month with whole Monday-to-Sunday weeks', () => {
    const march = monthGridDays('2026-03-17')
    expect(march[0]).toBe('2026-02-23')
    expect(march.at(-1)).toBe('2026-04-05')
    expect(march).toHaveLength(42)
    expect(march).toContain('2026-03-01')
    expect(march).toContain('2026-03-31')
    // February 2027 starts on a Monday and ends on a Sunday: exactly four weeks.
    expect(monthGridDays('2027-02-01')).toHaveLength(28)
    expect(monthGridDays('2027-02-01')[0]).toBe('2027-02-01')
  })
})

describe('how dates read', () => {
  it('formats a local calendar date with no time zone shift', () => {
    expect(formatLocalDate('2026-03-04')).toBe('Wed, Mar 4, 2026')
    expect(formatLocalDate('2026-03-04', 'monthDay')).toBe('Mar 4')
    expect(formatLocalDate('2026-03-04', 'monthYear')).toBe('March 2026')
    expect(formatLocalDate('2026-03', 'monthYear')).toBe('March 2026')
    expect(formatLocalDate('2026-03-04', 'longWeekdayMonthDay')).toBe('Wednesday, March 4')
    expect(formatLocalDate('2026-03-08', 'weekdayMonthDay')).toBe('Sun, Mar 8')
  })
  it('names months', () => {
    expect(monthName(1)).toBe('January')
    expect(monthName(9, true)).toBe('Sep')
    expect(monthName(12)).toBe('December')
  })
  it("formats an instant on the company's clock, not the machine's", () => {
    const lateEvening = '2026-03-05T04:30:00Z'
    expect(formatInstant(lateEvening, 'America/Chicago')).toBe('Mar 4, 2026, 10:30 PM')
    expect(formatInstant(lateEvening, 'UTC')).toBe('Mar 5, 2026, 4:30 AM')
    expect(formatInstant('2026-03-09T14:05:00Z', 'America/Chicago', 'time')).toBe('9:05 AM') // CDT, UTC−5
    expect(formatInstant('2026-03-06T14:05:00Z', 'America/Chicago', 'time')).toBe('8:05 AM') // CST, UTC−6
    expect(formatInstant(null, 'UTC')).toBe('—')
    expect(formatInstant('not a date', 'UTC', 'date', '')).toBe('')
  })
})
