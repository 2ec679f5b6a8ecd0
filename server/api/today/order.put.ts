import { routeOrderSchema } from '../../../shared/schemas/visits'
import { setRouteOrder } from '../../services/today'

// The technician's own order for a day; an empty list goes back to the computed one.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'today.read' })
  const input = await readBodyAs(event, routeOrderSchema)
  return setRouteOrder(user, input.date, input.visitIds, requestIp(event))
})
