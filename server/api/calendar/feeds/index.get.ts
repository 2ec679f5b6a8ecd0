import { myFeed } from '../../../services/calendar'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'calendar.own' })
  return myFeed(user)
})
