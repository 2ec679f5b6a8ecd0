import { replanBody } from '../../../shared/schemas/replan'
import { replanApply, replanPreview } from '../../services/replan'

// "Plan these weeks again": a preview of the moves; with apply and the preview's token, those moves.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const body = await readBodyAs(event, replanBody)
  const range = { from: body.from, to: body.to }
  if (body.apply) return replanApply(user, range, body.token!, requestIp(event))
  return replanPreview(user, range)
})
