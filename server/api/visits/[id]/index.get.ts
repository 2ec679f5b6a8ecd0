import { idParam } from '../../../../shared/schemas/common'
import { getVisit } from '../../../services/schedule'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'contracts.read' })
  const { id } = paramsAs(event, idParam)
  return getVisit(user, id)
})
