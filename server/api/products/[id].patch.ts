import { idParam } from '../../../shared/schemas/common'
import { productUpdateSchema } from '../../../shared/schemas/visit-record'
import { updateProduct } from '../../services/products'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'products.manage' })
  const { id } = paramsAs(event, idParam)
  const input = await readBodyAs(event, productUpdateSchema)
  return updateProduct(user, id, input, requestIp(event))
})
