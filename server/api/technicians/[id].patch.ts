import { idParam } from '../../../shared/schemas/common'
import { staffProfileSchema } from '../../../shared/schemas/visits'
import { updateStaffProfile } from '../../services/schedule'

// Capacity (minutes of work a day) and home base of a technician.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, staffProfileSchema)
  return updateStaffProfile(user, id, input, requestIp(event))
})
