import { idParam } from '../../../shared/schemas/common'
import { featureUpdateSchema } from '../../../shared/schemas/features'
import { updateFeature } from '../../services/features'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, featureUpdateSchema)
  return updateFeature(user, id, input, requestIp(event))
})
