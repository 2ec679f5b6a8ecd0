import { idParam } from '../../../../shared/schemas/common'
import { getRequest } from '../../../services/requests'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'requests.read' })
  const { id } = paramsAs(event, idParam)
  return getRequest(user, id)
})
