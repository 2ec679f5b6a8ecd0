import { idParam } from '../../../shared/schemas/common'
import { removeCustomer } from '../../services/customers'

// Deletes a customer without history; otherwise archives it (restore with PATCH { archived: false }).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const { id } = paramsAs(event, idParam)
  return removeCustomer(user, id, requestIp(event))
})
