import { z } from 'zod'
import { idParam } from '../../../shared/schemas/common'
import { closeAlert } from '../../services/alerts'

const body = z.object({
  status: z.enum(['acknowledged', 'resolved'], 'Choose acknowledged or resolved'),
  note: z.string().trim().max(500).default(''),
}).refine(b => b.status !== 'resolved' || b.note.length > 0, { path: ['note'], message: 'Say what was done' })

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, body)
  return closeAlert(user, id, input, requestIp(event))
})
