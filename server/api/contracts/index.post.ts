import { contractSchema } from '../../../shared/schemas/contracts'
import { createContract } from '../../services/contracts'

// A new contract starts as a draft; POST …/actions { action: 'activate' } generates its visits.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.manage' })
  const input = await readBodyAs(event, contractSchema)
  setResponseStatus(event, 201)
  return createContract(user, input, requestIp(event))
})
