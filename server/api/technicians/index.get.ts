import { listTechnicians } from '../../services/schedule'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  const rows = await listTechnicians(user)
  return { rows, total: rows.length, page: 1, pageSize: 100 }
})
