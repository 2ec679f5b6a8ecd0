import { idParam } from '../../../shared/schemas/common'
import { planUpdateSchema } from '../../../shared/schemas/plans'
import { updatePlan } from '../../services/plans'

// Editing the templates regenerates the future, unstarted visits of the plan's active contracts.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'plans.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, planUpdateSchema)
  return updatePlan(user, id, input, requestIp(event))
})
