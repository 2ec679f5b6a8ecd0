import { companyUpdateSchema } from '../../../shared/schemas/company'
import { updateCompany } from '../../services/company'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'settings.manage' })
  const input = await readBodyAs(event, companyUpdateSchema)
  return updateCompany(user, input, requestIp(event))
})
