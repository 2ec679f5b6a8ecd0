import { idParam } from '../../../shared/schemas/common'
import { getSite } from '../../services/sites'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  return getSite(user, id)
})
