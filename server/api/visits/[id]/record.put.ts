import { idParam } from '../../../../shared/schemas/common'
import { visitRecordSchema } from '../../../../shared/schemas/visit-record'
import { saveVisitRecord } from '../../../services/visit-records'

// The whole record as the phone holds it. Idempotent: readings and doses carry the phone's ids.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, visitRecordSchema)
  return saveVisitRecord(user, id, input, requestIp(event))
})
