import { invoiceListQuery } from '../../../shared/schemas/billing'
import { listInvoices } from '../../services/invoices'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'invoices.read' })
  return listInvoices(user, queryAs(event, invoiceListQuery))
})
