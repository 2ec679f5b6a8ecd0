import { invoiceExportQuery } from '../../../shared/schemas/billing'
import { exportInvoicesCsv } from '../../services/invoices'

// The invoices table as CSV, with the same filters and order as the list.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'billing.manage' })
  const csv = await exportInvoicesCsv(user, queryAs(event, invoiceExportQuery))
  setResponseHeader(event, 'Content-Type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'Content-Disposition', `attachment; filename="invoices-${new Date().toISOString().slice(0, 10)}.csv"`)
  return csv
})
