import { idParam } from '../../../../shared/schemas/common'
import { contractUpdateSchema } from '../../../../shared/schemas/contracts'
import { updateContract } from '../../../services/contracts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, contractUpdateSchema)
  return updateContract(user, id, input, requestIp(event))
})
