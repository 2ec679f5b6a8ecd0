import { idParam } from '../../../../shared/schemas/common'
import { visitRecordSchemaFor } from '../../../../shared/schemas/visit-record'
import { unitSystemOf } from '../../../services/company'
import { saveVisitRecord } from '../../../services/visit-records'

// The whole record as the phone holds it. Idempotent: readings and doses carry the phone's ids.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  // Limits in the messages are quoted in the units the technician typed.
  const input = await readBodyAs(event, visitRecordSchemaFor(await unitSystemOf(user)))
  return saveVisitRecord(user, id, input, requestIp(event))
})
