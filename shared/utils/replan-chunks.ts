// "Plan these weeks again" runs a week at a time so the board can show real progress ("week 3 of
// 8"): the range split into consecutive 7-day pieces, the last one shorter when the range is.
// Pure. Each piece is planned on its own, so the planner moves visits within a piece, not across.
import { addDays, type LocalDate } from './company-time'

export function replanChunks(from: LocalDate, to: LocalDate, days = 7): Array<{ from: LocalDate, to: LocalDate }> {
  if (!from || !to || to < from || days < 1) return []
  const out: Array<{ from: LocalDate, to: LocalDate }> = []
  for (let start = from; start <= to; start = addDays(start, days)) {
    const end = addDays(start, days - 1)
    out.push({ from: start, to: end < to ? end : to })
  }
  return out
}
