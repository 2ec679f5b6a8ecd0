import { planSchema } from '../../../shared/schemas/plans'
import { createPlan } from '../../services/plans'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'plans.manage' })
  const input = await readBodyAs(event, planSchema)
  setResponseStatus(event, 201)
  return createPlan(user, input, requestIp(event))
})
