import { siteSchema } from '../../../shared/schemas/sites'
import { createSite } from '../../services/sites'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const input = await readBodyAs(event, siteSchema)
  setResponseStatus(event, 201)
  return createSite(user, input, requestIp(event))
})
