import { formatInstant, formatLocalDate, localToday, type LocalDateStyle } from '#shared/utils/company-time'

type When = string | number | Date | null | undefined

/**
 * Dates and times as people read them, through the company's calendar (`shared/utils/company-time`):
 * in the company's time zone and one fixed locale, so the server's render and the browser's agree
 * (no hydration mismatch) and a technician abroad sees the company's clock and the company's today.
 */
export function useDates() {
  const companyFetch = useFetch('/api/company', { key: 'company' })
  const { data: company } = companyFetch
  const timeZone = computed(() => company.value?.timeZone || 'UTC')
  return {
    timeZone,
    /** Resolves once the company's time zone is known: await it before taking `today()` as a form's default. */
    ready: Promise.resolve(companyFetch).then(() => undefined),
    /** The company's today, YYYY-MM-DD (for date pickers' defaults and Today buttons). */
    today: () => localToday(timeZone.value),
    /** "Mar 4, 2026, 3:05 PM" */
    dateTime: (when: When, empty?: string) => formatInstant(when, timeZone.value, 'dateTime', empty),
    /** "Mar 4, 2026" */
    date: (when: When, empty?: string) => formatInstant(when, timeZone.value, 'date', empty),
    /** "Mar 4" */
    monthDay: (when: When, empty?: string) => formatInstant(when, timeZone.value, 'monthDay', empty),
    /** A calendar day of the company ("2026-03-04") as "Wed, Mar 4, 2026", or another style (no time zone shift: it is already local). */
    day: (ymd: string | null | undefined, style: LocalDateStyle = 'weekdayDate', empty = '—') => (ymd ? formatLocalDate(ymd, style) : empty),
    /** "3:05 PM" */
    time: (when: When, empty?: string) => formatInstant(when, timeZone.value, 'time', empty),
  }
}
