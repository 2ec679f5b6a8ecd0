import { requestPhotoFields } from '../../../../shared/schemas/portal'
import { idParam } from '../../../../shared/schemas/common'
import { addRequestPhoto, getRequest } from '../../../services/requests'

// multipart/form-data: file, id (made by the browser, so a retry is the same photo), caption?
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'requests.create' })
  const { id } = paramsAs(event, idParam)
  // Someone else's request is a 404 before any upload is read.
  await getRequest(user, id)
  const upload = await readPhotoUpload(event, requestPhotoFields)
  setResponseStatus(event, 201)
  return addRequestPhoto(user, id, { ...upload.fields, file: upload.file }, requestIp(event))
})
