import { idParam } from '../../../../shared/schemas/common'
import { startVisit } from '../../../services/visit-records'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  return startVisit(user, id, requestIp(event))
})
