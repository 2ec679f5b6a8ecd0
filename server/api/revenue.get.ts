import { revenueQuery } from '../../shared/schemas/billing'
import { revenueView } from '../services/revenue'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'revenue.read' })
  const { asOf } = queryAs(event, revenueQuery)
  return revenueView(user.companyId, asOf)
})
