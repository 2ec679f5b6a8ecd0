import { isDatabaseDown, isWriteConflict } from '../utils/db'

// While the database cannot be reached, answer 503 with a clear message (and a Retry-After)
// instead of a 500; the pool reconnects by itself once the database is back. A transaction the
// database gave up because it met another at the same moment (deadlock) was rolled back whole:
// 503 too, saying nothing was saved and to send it again.
export default defineNitroPlugin((nitroApp) => {
  const handle = nitroApp.h3App.options.onError
  nitroApp.h3App.options.onError = (error, event) => {
    if (isDatabaseDown(error)) {
      setResponseHeader(event, 'Retry-After', 5)
      const unavailable = createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'The database is not reachable right now; try again in a moment', data: {} })
      return handle ? handle(unavailable, event) : undefined
    }
    if (isWriteConflict(error)) {
      setResponseHeader(event, 'Retry-After', 1)
      const conflict = createError({ statusCode: 503, statusMessage: 'Service Unavailable', message: 'Another change to the same records was being saved at the same moment, so nothing of this one was saved; send it again', data: {} })
      return handle ? handle(conflict, event) : undefined
    }
    return handle ? handle(error, event) : undefined
  }
})
