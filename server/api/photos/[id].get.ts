import { z } from 'zod'
import { idParam } from '../../../shared/schemas/common'
import { readPhoto } from '../../services/photos'

const query = z.object({ size: z.enum(['full', 'thumb']).default('full') })

// Staff of the company and the customer the photo belongs to.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { permission: 'records.read' })
  const { id } = paramsAs(event, idParam)
  const { size } = queryAs(event, query)
  const photo = await readPhoto(user, id, size)
  setResponseHeader(event, 'content-type', photo.contentType)
  setResponseHeader(event, 'cache-control', 'private, max-age=86400')
  return photo.data
})
