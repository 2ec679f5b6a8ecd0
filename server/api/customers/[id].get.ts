import { idParam } from '../../../shared/schemas/common'
import { getCustomer } from '../../services/customers'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  return getCustomer(user, id)
})
