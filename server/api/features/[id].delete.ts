import { idParam } from '../../../shared/schemas/common'
import { removeFeature } from '../../services/features'

// Deletes a feature without history; otherwise archives it.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const { id } = paramsAs(event, idParam)
  return removeFeature(user, id, requestIp(event))
})
