import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { localDate } from '../../../shared/schemas/fields'
import { listVisits } from '../../services/schedule'

const query = pageQuery.omit({ q: true }).extend({
  customerId: z.uuid().optional(),
  contractId: z.uuid().optional(),
  from: localDate.optional(),
  upcoming: z.coerce.boolean().default(false),
})

// A customer sees their own visits; staff filter by customer or contract.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.read' })
  return listVisits(user, queryAs(event, query))
})
