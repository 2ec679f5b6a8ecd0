type When = string | number | Date | null | undefined

/**
 * Dates and times as people read them: in the company's time zone and one fixed locale, so the
 * server's render and the browser's agree (no hydration mismatch) and a technician abroad sees
 * the company's clock.
 */
export function useDates() {
  const { data: company } = useFetch('/api/company', { key: 'company' })
  const timeZone = computed(() => company.value?.timeZone || 'UTC')
  const format = (when: When, opts: Intl.DateTimeFormatOptions, empty = '—') => {
    if (when == null || when === '') return empty
    const d = when instanceof Date ? when : new Date(when)
    return Number.isNaN(d.getTime()) ? empty : new Intl.DateTimeFormat('en-US', { ...opts, timeZone: timeZone.value }).format(d)
  }
  return {
    timeZone,
    /** "Mar 4, 2026, 3:05 PM" */
    dateTime: (when: When, empty?: string) => format(when, { dateStyle: 'medium', timeStyle: 'short' }, empty),
    /** "Mar 4, 2026" */
    date: (when: When, empty?: string) => format(when, { dateStyle: 'medium' }, empty),
    /** A calendar day of the company ("2026-03-04") as "Wed, Mar 4, 2026" (no time zone shift: it is already local). */
    day: (ymd: string | null | undefined, empty = '—') => (ymd ? new Intl.DateTimeFormat('en-US', { weekday: 'short', month: 'short', day: 'numeric', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${ymd}T12:00:00Z`)) : empty),
    /** "3:05 PM" */
    time: (when: When, empty?: string) => format(when, { hour: 'numeric', minute: '2-digit' }, empty),
  }
}
