import { contractListQuery } from '../../../shared/schemas/contracts'
import { listContracts } from '../../services/contracts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.read' })
  return listContracts(user, queryAs(event, contractListQuery))
})
