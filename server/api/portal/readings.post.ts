import { customerReadingSchema } from '../../../shared/schemas/portal'
import { addCustomerReading } from '../../services/portal'

// A test the customer took themselves (saved as customer-entered).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.write' })
  const input = await readBodyAs(event, customerReadingSchema)
  setResponseStatus(event, 201)
  return addCustomerReading(user, input, requestIp(event))
})
