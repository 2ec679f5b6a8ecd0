import { endSession } from '../../services/sign-in'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  await endSession(user.sessionId)
  clearSessionCookie(event)
  return { ok: true }
})
