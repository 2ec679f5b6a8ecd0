import { idParam } from '../../../../shared/schemas/common'
import { portalVisitReport } from '../../../services/portal'

// One visit report, with the e-mail the customer was sent.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.read' })
  const { id } = paramsAs(event, idParam)
  return portalVisitReport(user, id)
})
