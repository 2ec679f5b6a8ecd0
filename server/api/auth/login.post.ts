import { signInSchema } from '../../../shared/schemas/auth'
import { checkCredentials } from '../../services/sign-in'

// Public: the sign-in endpoint. Sets the session cookie (HttpOnly, SameSite=Lax, Secure over
// HTTPS) for the browser and returns `{ token }` for scripts, which send it as
// `Authorization: Bearer`. The sign-in form asks with `X-Rillbook-Session: cookie` and gets no
// token in the body, only the non-secret marker nuxt-auth keeps (`session`), so page script
// never holds the token.
export default defineEventHandler(async (event) => {
  const input = await readBodyAs(event, signInSchema)
  const user = await checkCredentials(input, requestIp(event))
  const token = await createSession(user.id, event)
  setSessionCookie(event, token)
  const shown = { id: user.id, email: user.email, name: user.name, role: user.role, customerId: user.customerId }
  if (getRequestHeader(event, 'x-rillbook-session') === 'cookie') return { session: 'cookie', user: shown }
  return { token, user: shown }
})
