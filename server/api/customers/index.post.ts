import { customerSchema } from '../../../shared/schemas/customers'
import { createCustomer } from '../../services/customers'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const input = await readBodyAs(event, customerSchema)
  setResponseStatus(event, 201)
  return createCustomer(user, input, requestIp(event))
})
