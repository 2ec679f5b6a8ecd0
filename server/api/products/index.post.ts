import { productSchema } from '../../../shared/schemas/visit-record'
import { createProduct } from '../../services/products'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'products.manage' })
  const input = await readBodyAs(event, productSchema)
  setResponseStatus(event, 201)
  return createProduct(user, input, requestIp(event))
})
