import { idParam } from '../../../shared/schemas/common'
import { getPlan } from '../../services/plans'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner', 'technician'] })
  const { id } = paramsAs(event, idParam)
  return getPlan(user, id)
})
