import { isDatabaseDown } from '../utils/db'

// While the database cannot be reached, answer 503 with a clear message (and a Retry-After)
// instead of a 500; the pool reconnects by itself once the database is back.
export default defineNitroPlugin((nitroApp) => {
  const handle = nitroApp.h3App.options.onError
  nitroApp.h3App.options.onError = (error, event) => {
    if (isDatabaseDown(error)) {
      setResponseHeader(event, 'Retry-After', 5)
      const unavailable = createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'The database is not reachable right now; try again in a moment', data: {} })
      return handle ? handle(unavailable, event) : undefined
    }
    return handle ? handle(error, event) : undefined
  }
})
