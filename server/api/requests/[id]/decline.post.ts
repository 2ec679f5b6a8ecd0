import { requestDeclineSchema } from '../../../../shared/schemas/portal'
import { idParam } from '../../../../shared/schemas/common'
import { declineRequest } from '../../../services/requests'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'requests.manage' })
  const { id } = paramsAs(event, idParam)
  const { reply } = await readBodyAs(event, requestDeclineSchema)
  return declineRequest(user, id, reply, requestIp(event))
})
