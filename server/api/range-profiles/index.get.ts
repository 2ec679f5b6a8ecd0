import { listRangeProfiles } from '../../services/range-profiles'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner', 'technician'] })
  return listRangeProfiles(user)
})
