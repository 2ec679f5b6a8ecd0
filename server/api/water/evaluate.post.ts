import { evaluateRequestSchemaFor } from '../../../shared/schemas/water'
import { unitSystemOf } from '../../services/company'
import { evaluateWater } from '../../services/water'

// Computed values, statuses and dosing suggestions for a reading; customers only for their own features.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'water.evaluate' })
  const input = await readBodyAs(event, evaluateRequestSchemaFor(await unitSystemOf(user)))
  return evaluateWater(user, input)
})
