import { idParam } from '../../../shared/schemas/common'
import { userUpdateSchema } from '../../../shared/schemas/users'
import { updateUser } from '../../services/users'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'users.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, userUpdateSchema)
  return updateUser(user, id, input, requestIp(event))
})
