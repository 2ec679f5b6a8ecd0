import { idParam } from '../../../../shared/schemas/common'
import { getContract } from '../../../services/contracts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.read' })
  const { id } = paramsAs(event, idParam)
  return getContract(user, id)
})
