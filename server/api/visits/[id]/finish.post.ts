import { z } from 'zod'
import { idParam } from '../../../../shared/schemas/common'
import type { UnitSystem } from '../../../../shared/utils/water/format'
import { perUnitSystem } from '../../../../shared/schemas/water'
import { visitRecordSchemaFor } from '../../../../shared/schemas/visit-record'
import { unitSystemOf } from '../../../services/company'
import { finishVisit } from '../../../services/visit-records'

const bodyFor = perUnitSystem((system: UnitSystem) => z.object({ record: visitRecordSchemaFor(system).optional() }))

// Saves the last record, records the departure time and queues the report e-mail.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  // Limits in the messages are quoted in the units the technician typed.
  const input = await readBodyAs(event, bodyFor(await unitSystemOf(user)))
  return finishVisit(user, id, input.record, requestIp(event))
})
