import { idParam } from '../../../../shared/schemas/common'
import { visitUpdateSchema } from '../../../../shared/schemas/visits'
import { updateVisit } from '../../../services/schedule'

// Assign or reassign a technician; move a visit to another day (with a reason).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, visitUpdateSchema)
  return updateVisit(user, id, input, requestIp(event))
})
