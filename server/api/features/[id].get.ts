import { idParam } from '../../../shared/schemas/common'
import { getFeature } from '../../services/features'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  return getFeature(user, id)
})
