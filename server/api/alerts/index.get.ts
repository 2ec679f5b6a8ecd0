import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { listAlerts } from '../../services/alerts'

const query = pageQuery.omit({ q: true }).extend({
  status: z.enum(['open', 'acknowledged', 'resolved', 'active']).default('active'),
  severity: z.enum(['watch', 'act']).optional(),
  featureId: z.uuid().optional(),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  return listAlerts(user, queryAs(event, query))
})
