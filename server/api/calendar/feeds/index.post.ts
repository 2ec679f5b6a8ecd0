import { createFeed } from '../../../services/calendar'

// A new private feed URL; any earlier one of the caller stops working.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'calendar.own' })
  setResponseStatus(event, 201)
  return createFeed(user, getRequestURL(event).origin, requestIp(event))
})
