import { z } from 'zod'
import { listQuery } from '../../../shared/schemas/lists'
import { FEATURE_KINDS } from '../../../shared/types/water'
import { listFeatures } from '../../services/features'

const query = listQuery(['name', 'kind', 'volume', 'customer', 'createdAt']).extend({
  kind: z.enum(FEATURE_KINDS).optional(),
  customerId: z.uuid('Not a valid customer id').optional(),
  siteId: z.uuid('Not a valid site id').optional(),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  return listFeatures(user, queryAs(event, query))
})
