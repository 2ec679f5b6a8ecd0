import { idParam } from '../../../../shared/schemas/common'
import { revokeFeed } from '../../../services/calendar'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'calendar.own' })
  const { id } = paramsAs(event, idParam)
  return revokeFeed(user, id, requestIp(event))
})
