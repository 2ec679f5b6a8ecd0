import { listClosedDays } from '../../services/company'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner', 'technician'] })
  return listClosedDays(user)
})
