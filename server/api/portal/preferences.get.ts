import { getPreferences } from '../../services/portal'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.read' })
  return getPreferences(user)
})
