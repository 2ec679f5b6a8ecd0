import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { listSites } from '../../services/sites'

const query = pageQuery.extend({
  customerId: z.uuid('Not a valid customer id').optional(),
  status: z.enum(['current', 'archived', 'all']).default('current'),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  return listSites(user, queryAs(event, query))
})
