import { getCompany } from '../../services/company'

// Every signed-in user may read the company's name, currency and units (the UI formats with them).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  return getCompany(user)
})
