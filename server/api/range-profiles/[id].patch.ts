import { idParam } from '../../../shared/schemas/common'
import { rangeTableSchema } from '../../../shared/schemas/features'
import { text, updateSchema } from '../../../shared/schemas/fields'
import { updateRangeProfile } from '../../services/range-profiles'

// Exactly the fields sent change; `ranges` is the whole table.
const body = updateSchema({
  name: text(120, 'Name the profile'),
  ranges: rangeTableSchema,
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'profiles.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, body)
  return updateRangeProfile(user, id, input, requestIp(event))
})
