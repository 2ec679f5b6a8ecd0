import { pageQuery } from '../../../../shared/schemas/common'
import { portalVisits } from '../../../services/portal'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.read' })
  return portalVisits(user, queryAs(event, pageQuery))
})
