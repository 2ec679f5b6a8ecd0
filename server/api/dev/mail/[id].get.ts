import { z } from 'zod'
import { getCaughtMail } from '../../../services/mail'

// Ids are file names in the catcher's directory: word characters and dashes only (no paths).
const params = z.object({ id: z.string().regex(/^[\w-]+$/, 'Not a message id').max(100) })

export default defineEventHandler(async (event) => {
  await requireUser(event, { roles: ['owner'] })
  const { id } = paramsAs(event, params)
  return getCaughtMail(id)
})
