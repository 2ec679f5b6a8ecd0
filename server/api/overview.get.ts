import { ownerOverview } from '../services/overview'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'overview.read' })
  return ownerOverview(user)
})
