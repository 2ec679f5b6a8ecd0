import { z } from 'zod'
import { idParam } from '../../../../shared/schemas/common'
import { text } from '../../../../shared/schemas/fields'
import { addVisitPhoto } from '../../../services/photos'

const fields = z.object({
  id: z.uuid('Not a valid photo id'),
  featureId: z.uuid('Not a valid feature id').optional(),
  caption: text(200).default(''),
})

// multipart/form-data: file, id (made by the phone, so a retry is the same photo), featureId?, caption?
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'visits.work' })
  const { id } = paramsAs(event, idParam)
  const upload = await readPhotoUpload(event, fields)
  setResponseStatus(event, 201)
  return addVisitPhoto(user, id, { ...upload.fields, file: upload.file }, requestIp(event))
})
