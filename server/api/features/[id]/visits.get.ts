import { idParam, pageQuery } from '../../../../shared/schemas/common'
import { featureVisits } from '../../../services/history'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  return featureVisits(user, id, queryAs(event, pageQuery))
})
