import { idParam } from '../../../shared/schemas/common'
import { siteUpdateSchema } from '../../../shared/schemas/sites'
import { updateSite } from '../../services/sites'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.edit' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, siteUpdateSchema)
  return updateSite(user, id, input, requestIp(event))
})
