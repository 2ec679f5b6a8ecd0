import { idParam } from '../../../../shared/schemas/common'
import { invoiceForPdf } from '../../../services/invoices'
import { renderInvoicePdf } from '../../../utils/invoice-pdf'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'invoices.read' })
  const { id } = paramsAs(event, idParam)
  const { document, fileName } = await invoiceForPdf(user, id)
  const pdf = await renderInvoicePdf(document)
  setResponseHeader(event, 'Content-Type', 'application/pdf')
  setResponseHeader(event, 'Content-Disposition', `${getQuery(event).download === '1' ? 'attachment' : 'inline'}; filename="${fileName}"`)
  setResponseHeader(event, 'Cache-Control', 'private, no-store')
  return pdf
})
