import { runBilling } from '../../services/billing-run'
import { flushOutbox } from '../../services/mail'

// The billing job now, for the owner's company (it also runs daily for every company).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  const result = await runBilling({ companyId: user.companyId })
  void flushOutbox().catch(() => {})
  if (result.skipped) return result
  return { ...result, errors: result.errors.filter(e => e.companyId === user.companyId).map(({ subject, message }) => ({ subject, message })) }
})
