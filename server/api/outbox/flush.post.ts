import { z } from 'zod'
import { flushOutbox } from '../../services/mail'

const body = z.object({ retryNow: z.boolean().optional() })

export default defineEventHandler(async (event) => {
  await requireUser(event, { roles: ['owner'] })
  const { retryNow } = await readBodyAs(event, body)
  return flushOutbox({ retryNow })
})
