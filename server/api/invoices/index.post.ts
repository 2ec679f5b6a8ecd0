import { invoiceCreateSchema } from '../../../shared/schemas/billing'
import { createInvoice } from '../../services/invoices'

// An invoice the owner writes by hand (parts, extra visits, treatments); it is being prepared until issued.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  const input = await readBodyAs(event, invoiceCreateSchema)
  setResponseStatus(event, 201)
  return createInvoice(user, input, requestIp(event))
})
