import { idParam } from '../../../../shared/schemas/common'
import { bookRetest } from '../../../services/alert-retest'

// Books a retest visit at the alert's feature on the next working day; a second call returns the same visit.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner'] })
  const { id } = paramsAs(event, idParam)
  const result = await bookRetest(user, id, requestIp(event))
  if (result.created) setResponseStatus(event, 201)
  return result
})
