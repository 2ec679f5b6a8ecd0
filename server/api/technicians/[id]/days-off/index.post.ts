import { idParam } from '../../../../../shared/schemas/common'
import { dayOffCreateSchema } from '../../../../../shared/schemas/technician-days'
import { addDayOff } from '../../../../services/technician-days'

// Adds a day off or a range; the technician's visits on those days are listed and wait to be placed again.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, dayOffCreateSchema)
  setResponseStatus(event, 201)
  return addDayOff(user, id, input, requestIp(event))
})
