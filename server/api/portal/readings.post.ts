import { customerReadingSchemaFor } from '../../../shared/schemas/portal'
import { unitSystemOf } from '../../services/company'
import { addCustomerReading } from '../../services/portal'

// A test the customer took themselves (saved as customer-entered).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'portal.write' })
  const input = await readBodyAs(event, customerReadingSchemaFor(await unitSystemOf(user)))
  setResponseStatus(event, 201)
  return addCustomerReading(user, input, requestIp(event))
})
