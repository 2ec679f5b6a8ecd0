import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { text } from '../../../shared/schemas/fields'
import { listAudit } from '../../services/audit'

const query = pageQuery.omit({ q: true }).extend({
  subjectId: text(64).optional(),
  action: z.string().trim().regex(/^[a-z_.]+$/, 'Use an action name such as sign_in or user.role_changed').max(64).optional(),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'audit.read' })
  return listAudit(user.companyId, queryAs(event, query))
})
