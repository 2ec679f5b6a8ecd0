import { userCreateSchema } from '../../../shared/schemas/users'
import { createUser } from '../../services/users'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'users.manage' })
  const input = await readBodyAs(event, userCreateSchema)
  const created = await createUser(user, input, requestIp(event))
  setResponseStatus(event, 201)
  return created
})
