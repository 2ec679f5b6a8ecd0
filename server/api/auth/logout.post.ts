import { endSession } from '../../services/sign-in'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  await endSession(user.sessionId)
  deleteCookie(event, 'auth.token')
  return { ok: true }
})
