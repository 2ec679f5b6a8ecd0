import { featureSchema } from '../../../shared/schemas/features'
import { createFeature } from '../../services/features'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const input = await readBodyAs(event, featureSchema)
  setResponseStatus(event, 201)
  return createFeature(user, input, requestIp(event))
})
