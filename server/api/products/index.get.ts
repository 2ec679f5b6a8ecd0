import { listProducts } from '../../services/products'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { roles: ['owner', 'technician'] })
  return listProducts(user)
})
