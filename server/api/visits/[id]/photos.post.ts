import { z } from 'zod'
import { idParam } from '../../../../shared/schemas/common'
import { addVisitPhoto, MAX_PHOTO_BYTES } from '../../../services/photos'

const fields = z.object({
  id: z.uuid('Not a valid photo id'),
  featureId: z.uuid('Not a valid feature id').optional(),
  caption: z.string().trim().max(200).default(''),
})

// multipart/form-data: file, id (made by the phone, so a retry is the same photo), featureId?, caption?
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (length > MAX_PHOTO_BYTES + 64 * 1024) throw httpError(413, 'Invalid body: file — photos may be at most 15 MB', { fields: { file: 'At most 15 MB' } })
  const parts = await readMultipartFormData(event).catch(() => null)
  if (!parts) throw httpError(400, 'Invalid body: send the photo as multipart/form-data', { fields: { file: 'Missing' } })
  const file = parts.find(p => p.name === 'file' && p.filename !== undefined)
  if (!file?.data.length) throw httpError(400, 'Invalid body: file — choose a photo', { fields: { file: 'Choose a photo' } })
  const text = Object.fromEntries(parts.filter(p => p.filename === undefined && p.name).map(p => [p.name!, p.data.toString('utf8')]))
  const parsed = fields.safeParse(text)
  if (!parsed.success) throw httpError(400, `Invalid body: ${parsed.error.issues[0]!.path.join('.')} — ${parsed.error.issues[0]!.message}`, { fields: fieldErrors(parsed.error) })
  setResponseStatus(event, 201)
  return addVisitPhoto(user, id, { ...parsed.data, data: file.data }, requestIp(event))
})
