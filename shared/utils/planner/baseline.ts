// The simple plan to compare the planner with: each visit (earliest window first) on the first
// day of its window where some technician has room, with the nearest such technician (by
// distance from home). Same capacity rule and route check as the planner.
import { greatCircleKm } from '../route-order'
import { PlanBook } from './plan-book'
import { preparePlannerInput } from './prepare'
import type { PlannerInput, SeasonPlan } from './types'

export function planSeasonBaseline(input: PlannerInput): SeasonPlan {
  const P = preparePlannerInput(input)
  const book = new PlanBook(P)
  book.placeLocked()
  const order: number[] = []
  for (let v = 0; v < P.visits.length; v++) if (P.lockedTech[v]! < 0) order.push(v)
  order.sort((a, b) => P.earliest[a]! - P.earliest[b]! || a - b)
  for (const v of order) {
    const nearest = P.techs.map((t, i) => ({ i, km: greatCircleKm(t.home, P.visits[v]!) })).sort((a, b) => a.km - b.km || a.i - b.i)
    placing: for (let d = P.earliest[v]!; d <= P.latest[v]!; d++) {
      for (const { i } of nearest) {
        const at = book.fits(v, i, d)
        if (at) {
          book.place(v, i, d, at)
          break placing
        }
      }
    }
  }
  return book.finish()
}
