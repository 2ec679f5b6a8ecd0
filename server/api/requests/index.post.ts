import { serviceRequestSchema } from '../../../shared/schemas/portal'
import { createRequest } from '../../services/requests'

// A customer's request for a visit; photos follow with POST /api/requests/:id/photos.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'requests.create' })
  const input = await readBodyAs(event, serviceRequestSchema)
  setResponseStatus(event, 201)
  return createRequest(user, input, requestIp(event))
})
