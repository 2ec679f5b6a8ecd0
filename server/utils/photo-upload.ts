import type { H3Event } from 'h3'
import type { z } from 'zod'
import { fieldErrors } from '../../shared/utils/field-errors'
import { httpError } from './errors'

/** The largest photo accepted, before re-encoding. */
export const MAX_PHOTO_BYTES = 15 * 1024 * 1024

/**
 * One photo sent as multipart/form-data: the `file` part and the text parts parsed by `schema`.
 * Too large is a 413 before the body is read; a missing file or a bad field is a 400 naming it.
 */
export async function readPhotoUpload<S extends z.ZodType>(event: H3Event, schema: S): Promise<{ data: Buffer, fields: z.output<S> }> {
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (length > MAX_PHOTO_BYTES + 64 * 1024) throw httpError(413, 'Invalid body: file — photos may be at most 15 MB', { fields: { file: 'At most 15 MB' } })
  const parts = await readMultipartFormData(event).catch(() => null)
  if (!parts) throw httpError(400, 'Invalid body: send the photo as multipart/form-data', { fields: { file: 'Missing' } })
  const file = parts.find(p => p.name === 'file' && p.filename !== undefined)
  if (!file?.data.length) throw httpError(400, 'Invalid body: file — choose a photo', { fields: { file: 'Choose a photo' } })
  const text = Object.fromEntries(parts.filter(p => p.filename === undefined && p.name).map(p => [p.name!, p.data.toString('utf8')]))
  const parsed = schema.safeParse(text)
  if (!parsed.success) throw httpError(400, `Invalid body: ${parsed.error.issues[0]!.path.join('.')} — ${parsed.error.issues[0]!.message}`, { fields: fieldErrors(parsed.error) })
  return { data: file.data, fields: parsed.data }
}
