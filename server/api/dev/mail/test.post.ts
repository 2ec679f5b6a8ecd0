import { sendTestMail } from '../../../services/mail'

// Queues a test e-mail to the signed-in owner and sends it right away.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner'] })
  return sendTestMail(user)
})
