import { signInSchema } from '../../../shared/schemas/auth'
import { checkCredentials } from '../../services/sign-in'

// Public: the sign-in endpoint. Returns `{ token }` for `Authorization: Bearer`; in the browser
// nuxt-auth's local provider keeps the token in its `auth.token` cookie, which the guard also reads.
export default defineEventHandler(async (event) => {
  const input = await readBodyAs(event, signInSchema)
  const user = await checkCredentials(input, requestIp(event))
  const token = await createSession(user.id, event)
  return { token, user: { id: user.id, email: user.email, name: user.name, role: user.role, customerId: user.customerId } }
})
