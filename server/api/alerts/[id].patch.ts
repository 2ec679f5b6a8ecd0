import { alertCloseSchema } from '../../../shared/schemas/alerts'
import { idParam } from '../../../shared/schemas/common'
import { closeAlert } from '../../services/alerts'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, alertCloseSchema)
  return closeAlert(user, id, input, requestIp(event))
})
