import { idParam } from '../../../../shared/schemas/common'
import { getVisitRecord } from '../../../services/visit-records'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  return getVisitRecord(user, id)
})
