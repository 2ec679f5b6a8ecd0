import { z } from 'zod'
import { idParam } from '../../../shared/schemas/common'
import { text } from '../../../shared/schemas/fields'
import { closeAlert } from '../../services/alerts'

const body = z.object({
  status: z.enum(['acknowledged', 'resolved'], 'Choose acknowledged or resolved'),
  /** Left out, the alert keeps the note it has. */
  note: text(500).optional(),
}).refine(b => b.status !== 'resolved' || !!b.note, { path: ['note'], message: 'Say what was done' })

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.read' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, body)
  return closeAlert(user, id, input, requestIp(event))
})
