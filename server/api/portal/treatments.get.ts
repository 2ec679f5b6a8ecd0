import { portalTreatments } from '../../services/portal'

// The treatments the dosing helper offers (the company's catalogue: dechlorinator, bacteria, KH buffer, salt).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.read' })
  return { rows: await portalTreatments(user) }
})
