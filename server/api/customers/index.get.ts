import { pageQuery } from '../../../shared/schemas/common'
import { STAFF_ROLES } from '../../../shared/utils/roles'
import { listCustomers } from '../../services/customers'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: STAFF_ROLES })
  return listCustomers(user, queryAs(event, pageQuery))
})
