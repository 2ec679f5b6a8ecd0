import { z } from 'zod'
import { idParam } from '../../../../shared/schemas/common'
import { visitRecordSchema } from '../../../../shared/schemas/visit-record'
import { finishVisit } from '../../../services/visit-records'

const body = z.object({ record: visitRecordSchema.optional() })

// Saves the last record, records the departure time and queues the report e-mail.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, body)
  return finishVisit(user, id, input.record, requestIp(event))
})
