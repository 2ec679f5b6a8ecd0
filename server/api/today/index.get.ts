import { todayQuery } from '../../../shared/schemas/visits'
import { technicianDay } from '../../services/today'

// A technician's day in driving order; the owner may look at any technician's day.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'today.read' })
  return technicianDay(user, queryAs(event, todayQuery))
})
