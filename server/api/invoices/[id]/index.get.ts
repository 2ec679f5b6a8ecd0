import { idParam } from '../../../../shared/schemas/common'
import { getInvoice } from '../../../services/invoices'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'invoices.read' })
  const { id } = paramsAs(event, idParam)
  return getInvoice(user, id)
})
