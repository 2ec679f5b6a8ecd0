import { idParam } from '../../../../shared/schemas/common'
import { paymentPageUrl } from '../../../services/invoice-payments'

// The payment provider's page for one of the customer's open invoices; the portal sends them there.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'invoices.pay' })
  const { id } = paramsAs(event, idParam)
  return paymentPageUrl(user, id)
})
