import type { H3Event } from 'h3'
import { replanBody } from '../../../shared/schemas/replan'
import { replanApply, replanPreview, type ReplanProgress } from '../../services/replan'

// "Plan these weeks again": a preview of the moves for the whole range; with apply and the
// preview's token, those moves. A preview asked for with `Accept: application/x-ndjson` answers a
// stream of JSON lines: progress ({ stage, done, total }), then { preview } or { error }.
// Input and role are checked before anything streams, so those failures stay plain 4xx answers.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'schedule.manage' })
  const body = await readBodyAs(event, replanBody)
  const range = { from: body.from, to: body.to }
  if (body.apply) return replanApply(user, range, body.token!, requestIp(event))
  if ((getRequestHeader(event, 'accept') ?? '').includes('application/x-ndjson')) return streamPreview(event, send => replanPreview(user, range, send))
  return replanPreview(user, range)
})

/** The preview as JSON lines: each progress step as it happens, then the preview (or the error). */
function streamPreview(event: H3Event, run: (send: (p: ReplanProgress) => void) => Promise<unknown>) {
  setResponseHeaders(event, { 'content-type': 'application/x-ndjson; charset=utf-8', 'cache-control': 'no-store', 'x-accel-buffering': 'no' })
  const encoder = new TextEncoder()
  let last = ''
  let gone = false // the page went away: stop planning, write nothing more
  const stream = new ReadableStream<Uint8Array>({
    async start(controller) {
      const line = (value: unknown) => controller.enqueue(encoder.encode(`${JSON.stringify(value)}\n`))
      try {
        const preview = await run((p) => {
          if (gone) throw new Error('The page stopped listening')
          const text = JSON.stringify(p)
          if (text !== last) line(p)
          last = text
        })
        if (gone) return
        line({ preview })
      }
      catch (e) {
        if (gone) return
        const err = e as { statusCode?: number, message?: string }
        if (!err.statusCode || err.statusCode >= 500) console.error('replan preview failed', e)
        line({ error: err.statusCode && err.statusCode < 500 ? { statusCode: err.statusCode, message: err.message } : { statusCode: 500, message: 'The preview could not be worked out; nothing changed. Try again.' } })
      }
      controller.close()
    },
    cancel() {
      gone = true
    },
  })
  return sendStream(event, stream)
}
