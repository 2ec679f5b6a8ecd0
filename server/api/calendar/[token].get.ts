import { z } from 'zod'
import { renderFeed } from '../../services/calendar'

const params = z.object({ token: z.string().regex(/^[\w-]{20,64}(\.ics)?$/, 'Not a calendar feed address') })

// Public by design: the unguessable token in the address is the credential (calendar apps
// cannot sign in). Revoking the feed ends it.
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, params)
  const body = await renderFeed(token.replace(/\.ics$/, ''))
  if (!body) throw httpError(404, 'No such calendar feed')
  setResponseHeader(event, 'content-type', 'text/calendar; charset=utf-8')
  setResponseHeader(event, 'cache-control', 'private, max-age=300')
  return body
})
