import { invoiceUpdateSchema } from '../../../../shared/schemas/billing'
import { idParam } from '../../../../shared/schemas/common'
import { updateInvoice } from '../../../services/invoices'

// The lines and notes of an invoice being prepared; a due invoice is cancelled and raised again instead.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, invoiceUpdateSchema)
  return updateInvoice(user, id, input, requestIp(event))
})
