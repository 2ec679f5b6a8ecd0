import { idParam } from '../../../shared/schemas/common'
import { removeSite } from '../../services/sites'

// Deletes a site without features; otherwise archives it.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const { id } = paramsAs(event, idParam)
  return removeSite(user, id, requestIp(event))
})
