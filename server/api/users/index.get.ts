import { z } from 'zod'
import { pageQuery } from '../../../shared/schemas/common'
import { ROLES } from '../../../shared/utils/roles'
import { listUsers } from '../../services/users'

const query = pageQuery.extend({ role: z.enum(ROLES).optional() })

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'users.manage' })
  return listUsers(user, queryAs(event, query))
})
