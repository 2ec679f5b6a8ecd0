import { invoiceActionSchema } from '../../../../shared/schemas/billing'
import { idParam } from '../../../../shared/schemas/common'
import { actOnInvoice } from '../../../services/invoice-actions'

// issue | send | cancel | write_off | record_payment (cheque, bank transfer, cash).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, invoiceActionSchema)
  return actOnInvoice(user, id, input, requestIp(event))
})
