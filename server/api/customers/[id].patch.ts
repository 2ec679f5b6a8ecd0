import { idParam } from '../../../shared/schemas/common'
import { customerUpdateSchema } from '../../../shared/schemas/customers'
import { updateCustomer } from '../../services/customers'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, customerUpdateSchema)
  return updateCustomer(user, id, input, requestIp(event))
})
