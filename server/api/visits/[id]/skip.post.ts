import { idParam } from '../../../../shared/schemas/common'
import { skipSchema } from '../../../../shared/schemas/visit-record'
import { skipVisit } from '../../../services/visit-records'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, skipSchema)
  return skipVisit(user, id, input.reason, requestIp(event))
})
