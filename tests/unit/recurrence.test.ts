import { describe, expect, it } from 'vitest'
import {
  describeVisitRule, expandVisitRule, isLocalDate, localTimeToInstant, nearestWorkingDay, normalizeVisitRule, planVisitDates,
  reconcileVisits, RecurrenceRuleError, termEndFor, type ExistingVisit,
} from '../../shared/utils/recurrence'
import { groupRows } from '../../shared/utils/collections'

const weekdays = { workingDays: [1, 2, 3, 4, 5], closed: [] as string[] }

describe('visit rules (RFC 5545 RRULE through the rrule package)', () => {
  it('expands a fortnightly May–September rule from the term start', () => {
    const dates = expandVisitRule('FREQ=WEEKLY;INTERVAL=2;BYMONTH=5,6,7,8,9;BYDAY=TU', '2026-03-01', '2027-02-28')
    expect(dates[0]).toBe('2026-05-05')
    expect(dates.every(d => d >= '2026-05-01' && d <= '2026-09-30')).toBe(true)
    // Every 2 weeks from the first Tuesday on or after DTSTART that matches: consecutive gaps are 14 days.
    for (let i = 1; i < dates.length; i++) {
      expect((Date.parse(dates[i]!) - Date.parse(dates[i - 1]!)) / 86_400_000).toBe(14)
    }
    expect(dates.length).toBe(11)
  })

  it('yields one spring clean-out on the second Monday of April', () => {
    expect(expandVisitRule('FREQ=YEARLY;BYMONTH=4;BYDAY=MO;BYSETPOS=2', '2026-01-01', '2026-12-31')).toEqual(['2026-04-13'])
  })

  it('starts mid-season: only the dates on or after the term start', () => {
    const full = expandVisitRule('FREQ=WEEKLY;BYMONTH=10,11;BYDAY=TH', '2026-01-01', '2026-12-31')
    const late = expandVisitRule('FREQ=WEEKLY;BYMONTH=10,11;BYDAY=TH', '2026-10-20', '2027-10-19')
    expect(late[0]).toBe('2026-10-22')
    expect(full.filter(d => d >= '2026-10-20')).toEqual(late.filter(d => d <= '2026-12-31'))
  })

  it('handles a leap day: the 29th of February only in a leap year', () => {
    expect(expandVisitRule('FREQ=YEARLY;BYMONTH=2;BYMONTHDAY=29', '2027-01-01', '2028-12-31')).toEqual(['2028-02-29'])
    expect(termEndFor('2028-02-29', 12)).toBe('2029-02-27')
    expect(termEndFor('2026-03-01', 12)).toBe('2027-02-28')
  })

  it('a rule that yields no dates in the term gives no visits and no error', () => {
    expect(expandVisitRule('FREQ=YEARLY;BYMONTH=12;BYMONTHDAY=25', '2026-01-01', '2026-11-30')).toEqual([])
    expect(planVisitDates([{ id: 't', rrule: 'FREQ=YEARLY;BYMONTH=12;BYMONTHDAY=25' }], { start: '2026-01-01', end: '2026-11-30' }, weekdays)).toEqual([])
  })

  it('rejects rules it cannot use, with a plain message', () => {
    expect(() => normalizeVisitRule('')).toThrow(RecurrenceRuleError)
    expect(() => normalizeVisitRule('FREQ=SOMETIMES')).toThrow(RecurrenceRuleError)
    expect(() => normalizeVisitRule('FREQ=HOURLY')).toThrow(/at most daily/)
    expect(() => normalizeVisitRule('FREQ=WEEKLY;UNTIL=20261231')).toThrow(/DTSTART and UNTIL/)
    expect(normalizeVisitRule('RRULE:freq=weekly;byday=tu')).toBe('FREQ=WEEKLY;BYDAY=TU')
    expect(describeVisitRule('FREQ=WEEKLY;INTERVAL=2;BYDAY=TU')).toBe('every 2 weeks on Tuesday')
  })
})

describe('working days', () => {
  it('moves Saturday to Friday and Sunday to Monday', () => {
    expect(nearestWorkingDay('2026-05-09', weekdays)).toBe('2026-05-08')
    expect(nearestWorkingDay('2026-05-10', weekdays)).toBe('2026-05-11')
    expect(nearestWorkingDay('2026-05-12', weekdays)).toBe('2026-05-12')
  })
  it('moves a closed day to the nearest working day, the later one on a tie', () => {
    expect(nearestWorkingDay('2026-07-01', { workingDays: [1, 2, 3, 4, 5], closed: ['2026-07-01'] })).toBe('2026-07-02')
    expect(nearestWorkingDay('2026-07-03', { workingDays: [1, 2, 3, 4, 5], closed: ['2026-07-03'] })).toBe('2026-07-02')
  })
  it('stays inside the term', () => {
    // A Saturday term start cannot move back to the Friday before it.
    expect(nearestWorkingDay('2026-08-01', weekdays, { from: '2026-08-01', to: '2027-07-31' })).toBe('2026-08-03')
  })
  it('does not put two visits of one template on one day', () => {
    // Daily rule over a weekend: Sat → Fri and Sun → Mon collide with the real Fri and Mon.
    const planned = planVisitDates([{ id: 't', rrule: 'FREQ=DAILY' }], { start: '2026-05-08', end: '2026-05-11' }, weekdays)
    expect(planned.map(p => p.date)).toEqual(['2026-05-08', '2026-05-11'])
  })
})

describe('times in the company time zone', () => {
  // America/Chicago is UTC−5 in summer (CDT) and UTC−6 in winter (CST); US DST in 2026 starts
  // 8 March and ends 1 November (Energy Policy Act of 2005 rules, from memory).
  it('keeps 08:00 local across the daylight-saving change', () => {
    expect(localTimeToInstant('2026-03-06', '08:00', 'America/Chicago').toISOString()).toBe('2026-03-06T14:00:00.000Z')
    expect(localTimeToInstant('2026-03-09', '08:00', 'America/Chicago').toISOString()).toBe('2026-03-09T13:00:00.000Z')
    expect(localTimeToInstant('2026-11-02', '08:00', 'America/Chicago').toISOString()).toBe('2026-11-02T14:00:00.000Z')
  })
  it('a weekly rule across the DST change keeps its weekday and local dates', () => {
    const dates = expandVisitRule('FREQ=WEEKLY;BYDAY=TU', '2026-02-24', '2026-03-17')
    expect(dates).toEqual(['2026-02-24', '2026-03-03', '2026-03-10', '2026-03-17'])
  })
})

describe('regeneration', () => {
  const planned = (dates: Array<[string, string]>) => dates.map(([orig, date]) => ({ key: `t:${orig}`, templateId: 't', originalDate: orig, date }))
  const visit = (id: string, orig: string, over: Partial<ExistingVisit> = {}): ExistingVisit => ({
    id, generationKey: `t:${orig}`, status: 'scheduled', movedManually: false, scheduledOn: orig, statusReason: '', ...over,
  })

  it('creates only future visits, once', () => {
    const r = reconcileVisits([], planned([['2026-05-01', '2026-05-01'], ['2026-06-01', '2026-06-01']]), '2026-05-15')
    expect(r.insert.map(p => p.date)).toEqual(['2026-06-01'])
    const again = reconcileVisits([visit('a', '2026-06-01')], planned([['2026-05-01', '2026-05-01'], ['2026-06-01', '2026-06-01']]), '2026-05-15')
    expect(again.insert).toEqual([])
    expect(again.keep).toEqual(['a'])
  })

  it('keeps done, under-way, skipped and manually moved visits; changes only future unstarted ones', () => {
    const existing = [
      visit('done', '2026-06-02', { status: 'done', scheduledOn: '2026-06-02' }),
      visit('going', '2026-06-16', { status: 'in_progress' }),
      visit('moved', '2026-06-30', { movedManually: true, scheduledOn: '2026-07-01' }),
      visit('future', '2026-07-14'),
      visit('gone', '2026-07-28'),
    ]
    // The plan changed: the occurrences now fall a day later, and 07-28 is no longer wanted.
    const next = planned([['2026-06-02', '2026-06-03'], ['2026-06-16', '2026-06-17'], ['2026-06-30', '2026-07-01'], ['2026-07-14', '2026-07-15'], ['2026-08-11', '2026-08-11']])
    const r = reconcileVisits(existing, next, '2026-06-10')
    expect(r.reschedule).toEqual([{ id: 'future', date: '2026-07-15', revive: false }])
    expect(r.cancel).toEqual(['gone'])
    expect(r.insert.map(p => p.key)).toEqual(['t:2026-08-11'])
    expect(r.keep.sort()).toEqual(['done', 'going', 'moved'])
  })

  it('brings back a visit the system cancelled when the plan wants it again, but not one cancelled by a person', () => {
    const existing = [
      visit('paused', '2026-07-14', { status: 'cancelled', statusReason: 'Contract paused' }),
      visit('byhand', '2026-07-28', { status: 'cancelled', statusReason: 'Customer away' }),
    ]
    const r = reconcileVisits(existing, planned([['2026-07-14', '2026-07-14'], ['2026-07-28', '2026-07-28']]), '2026-07-01')
    expect(r.reschedule).toEqual([{ id: 'paused', date: '2026-07-14', revive: true }])
    expect(r.keep).toEqual(['byhand'])
    expect(r.insert).toEqual([])
  })

  it('brings back a manually moved visit after a pause, on the day it was moved to', () => {
    const existing = [visit('moved', '2026-07-14', { status: 'cancelled', statusReason: 'Contract paused', movedManually: true, scheduledOn: '2026-07-17' })]
    const r = reconcileVisits(existing, [], '2026-07-01')
    expect(r.reschedule).toEqual([{ id: 'moved', date: '2026-07-17', revive: true }])
  })

  it('never touches past scheduled visits (they are overdue, not regenerated)', () => {
    const r = reconcileVisits([visit('late', '2026-06-01')], [], '2026-06-10')
    expect(r.cancel).toEqual([])
    expect(r.keep).toEqual(['late'])
  })
})

describe('isLocalDate', () => {
  it.each([
    ['2027-03-01', true], ['2024-02-29', true], ['2000-02-29', true], ['2027-12-31', true], ['0001-01-01', true],
    ['2023-02-29', false], ['1900-02-29', false], ['2027-04-31', false], ['2027-13-01', false], ['2027-00-10', false],
    ['2027-01-00', false], ['2027-1-01', false], ['2027-01-01T00:00', false], [' 2027-01-01', false], ['', false],
  ])('%s → %s (the Gregorian calendar: leap years every 4, not every 100, again every 400)', (d, ok) => {
    expect(isLocalDate(d)).toBe(ok)
  })
})

describe('groupRows', () => {
  it('keeps each group in the order the rows came, groups in order of first appearance', () => {
    const groups = groupRows([{ k: 'b', n: 1 }, { k: 'a', n: 2 }, { k: 'b', n: 3 }], r => r.k)
    expect([...groups.keys()]).toEqual(['b', 'a'])
    expect(groups.get('b')!.map(r => r.n)).toEqual([1, 3])
  })
})
