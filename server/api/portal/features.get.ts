import { portalFeatures } from '../../services/portal'

// The customer's water features with their latest test in plain words, equipment and what is due.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.read' })
  return portalFeatures(user)
})
