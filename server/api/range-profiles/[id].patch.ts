import { z } from 'zod'
import { idParam } from '../../../shared/schemas/common'
import { rangeTableSchema } from '../../../shared/schemas/features'
import { updateRangeProfile } from '../../services/range-profiles'

const body = z.object({
  name: z.string().trim().min(1, 'Name the profile').max(120).optional(),
  ranges: rangeTableSchema.optional(),
}).refine(b => b.name !== undefined || b.ranges !== undefined, { path: ['_'], message: 'Nothing to change' })

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'profiles.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, body)
  return updateRangeProfile(user, id, input, requestIp(event))
})
