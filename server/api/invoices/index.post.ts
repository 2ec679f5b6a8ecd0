import { invoiceCreateSchema } from '../../../shared/schemas/billing'
import { createInvoice } from '../../services/invoices'

// A draft invoice the owner writes by hand (parts, extra visits, treatments); finalize opens it.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  const input = await readBodyAs(event, invoiceCreateSchema)
  setResponseStatus(event, 201)
  return createInvoice(user, input, requestIp(event))
})
