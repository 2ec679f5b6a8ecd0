import { requestScheduleSchema } from '../../../../shared/schemas/portal'
import { idParam } from '../../../../shared/schemas/common'
import { scheduleRequest } from '../../../services/requests'

// Books a visit for the request; the customer is told by e-mail and sees it in the portal.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'requests.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, requestScheduleSchema)
  return scheduleRequest(user, id, input, requestIp(event))
})
