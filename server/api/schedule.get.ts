import { boardQuery } from '../../shared/schemas/visits'
import { board } from '../services/schedule'

// The week and month boards: visits between two dates, with each technician's load per day.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  return board(user, queryAs(event, boardQuery))
})
