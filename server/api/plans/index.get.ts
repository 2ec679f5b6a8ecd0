import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { listPlans } from '../../services/plans'

const query = pageQuery.extend({ status: z.enum(['current', 'archived', 'all']).default('current') })

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner', 'technician'] })
  return listPlans(user, queryAs(event, query))
})
