import { lastBillingRuns } from '../../services/billing-run'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  return { rows: await lastBillingRuns(user.companyId) }
})
