import { idParam } from '../../../../../shared/schemas/common'
import { listDaysOff } from '../../../../services/technician-days'

// A technician's days off (holiday, training, sick).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const { id } = paramsAs(event, idParam)
  return listDaysOff(user, id)
})
