import { preferencesSchema } from '../../../shared/schemas/portal'
import { updatePreferences } from '../../services/portal'

// Which contacts get reports, invoices and alerts; the units this sign-in reads in.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.write' })
  const input = await readBodyAs(event, preferencesSchema)
  return updatePreferences(user, input, requestIp(event))
})
