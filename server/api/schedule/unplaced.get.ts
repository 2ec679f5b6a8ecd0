import { unplacedQuery } from '../../../shared/schemas/replan'
import { unplacedVisits } from '../../services/replan'

// The visits the planner could not place in a date range, with its reasons (the board's tray).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  return unplacedVisits(user, queryAs(event, unplacedQuery))
})
