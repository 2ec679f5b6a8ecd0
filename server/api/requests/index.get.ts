import { requestListQuery } from '../../../shared/schemas/portal'
import { listRequests } from '../../services/requests'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'requests.read' })
  return listRequests(user, queryAs(event, requestListQuery))
})
