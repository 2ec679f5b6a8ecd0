import { myCustomer } from '../../services/customers'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.read' })
  return { customer: await myCustomer(user) }
})
