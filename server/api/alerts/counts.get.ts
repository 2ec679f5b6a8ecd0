import { openAlertCounts } from '../../services/alerts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  return openAlertCounts(user)
})
