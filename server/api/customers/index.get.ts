import { z } from 'zod'
import { CUSTOMER_KINDS, CUSTOMER_SORTS } from '../../../shared/schemas/customers'
import { text } from '../../../shared/schemas/fields'
import { listQuery } from '../../../shared/schemas/lists'
import { listCustomers } from '../../services/customers'

const query = listQuery(CUSTOMER_SORTS).extend({
  kind: z.enum(CUSTOMER_KINDS).optional(),
  tag: text(40).toLowerCase().optional(),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  return listCustomers(user, queryAs(event, query))
})
