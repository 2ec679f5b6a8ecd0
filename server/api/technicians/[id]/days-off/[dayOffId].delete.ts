import { dayOffParams } from '../../../../../shared/schemas/technician-days'
import { removeDayOff } from '../../../../services/technician-days'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const { id, dayOffId } = paramsAs(event, dayOffParams)
  return removeDayOff(user, id, dayOffId, requestIp(event))
})
