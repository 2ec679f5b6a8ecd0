import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { listOutbox } from '../../services/mail'

const query = pageQuery.omit({ q: true }).extend({
  status: z.enum(['pending', 'sent', 'failed']).optional(),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner'] })
  return listOutbox(user.companyId, queryAs(event, query))
})
