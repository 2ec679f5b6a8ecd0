import { closedDaysSchema } from '../../../shared/schemas/company'
import { replaceClosedDays } from '../../services/company'

// Replaces the upcoming closed days; future generated visits move off them.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'settings.manage' })
  const input = await readBodyAs(event, closedDaysSchema)
  return replaceClosedDays(user, input, requestIp(event))
})
