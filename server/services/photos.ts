import { and, eq } from 'drizzle-orm'
import sharp, { type OutputInfo } from 'sharp'
import { photos, visits, waterFeatures } from '../db/schema'
import { isStaff, type SessionUser } from '../utils/auth'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import { MAX_PHOTO_BYTES } from '../utils/photo-upload'
import { recordAudit } from './audit'
import { thumbKey } from './visit-report'

const fullKey = (id: string) => `photos/${id}/full.jpg`

/** What the bytes say the file is (the name and the browser's type are not trusted). */
export function sniffImageType(b: Uint8Array): 'jpeg' | 'png' | 'webp' | 'heic' | null {
  if (b.length >= 3 && b[0] === 0xFF && b[1] === 0xD8 && b[2] === 0xFF) return 'jpeg'
  if (b.length >= 8 && [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A].every((x, i) => b[i] === x)) return 'png'
  const ascii = (from: number, to: number) => String.fromCharCode(...b.slice(from, to))
  if (b.length >= 12 && ascii(0, 4) === 'RIFF' && ascii(8, 12) === 'WEBP') return 'webp'
  if (b.length >= 12 && ascii(4, 8) === 'ftyp' && ['heic', 'heix', 'hevc', 'heim', 'heis', 'mif1', 'msf1'].includes(ascii(8, 12))) return 'heic'
  return null
}

/**
 * Stores a visit photo: checks size and type from the bytes, re-encodes it with sharp (which
 * drops EXIF, including the location), makes a thumbnail, and keeps both in `uploads`.
 * Uploading the same id again returns the stored photo.
 */
export async function addVisitPhoto(actor: SessionUser, visitId: string, input: { id: string, data: Buffer, featureId?: string | null, caption: string }, ip: string) {
  const db = useDb()
  const [v] = await db.select().from(visits).where(and(eq(visits.id, visitId), eq(visits.companyId, actor.companyId))).limit(1)
  if (!v) throw httpError(404, 'No such visit')
  if (actor.role !== 'owner' && v.technicianId !== actor.id) throw httpError(403, 'This visit is assigned to someone else')
  if (!['in_progress', 'done'].includes(v.status)) throw httpError(409, 'Start the visit before adding photos')
  const [existing] = await db.select().from(photos).where(eq(photos.id, input.id)).limit(1)
  if (existing) {
    if (existing.visitId !== visitId) throw httpError(409, 'A photo with this id belongs to another visit')
    return existing
  }
  if (input.featureId) {
    const [f] = await db.select({ id: waterFeatures.id }).from(waterFeatures).where(and(eq(waterFeatures.id, input.featureId), eq(waterFeatures.siteId, v.siteId))).limit(1)
    if (!f) throw httpError(400, 'Invalid body: featureId — not a feature of this visit', { fields: { featureId: 'Not a feature of this visit' } })
  }
  return storePhoto(actor, { visitId, requestId: null, customerId: v.customerId, featureId: input.featureId ?? null }, input, { action: 'visit.photo_added', subjectType: 'visit', subjectId: visitId, ip })
}

/**
 * Checks, re-encodes and stores one photo, then writes its row (and an audit entry) for a visit
 * or a customer's request. The bytes decide the type; sharp re-encodes to JPEG without metadata
 * (EXIF, including the location, is gone) and makes the thumbnail. A failed write removes the files.
 */
export async function storePhoto(
  actor: SessionUser,
  owner: { visitId: string | null, requestId: string | null, customerId: string, featureId: string | null },
  input: { id: string, data: Buffer, caption: string },
  audit: { action: string, subjectType: string, subjectId: string, ip: string },
  tx?: Tx,
) {
  if (input.data.length > MAX_PHOTO_BYTES) throw httpError(413, `Invalid body: file — photos may be at most 15 MB (this one is ${(input.data.length / 1048576).toFixed(1)} MB)`, { fields: { file: 'At most 15 MB' } })
  const kind = sniffImageType(input.data)
  if (kind === 'heic') throw httpError(415, 'Invalid body: file — HEIC photos cannot be converted here. Set the camera to JPEG ("most compatible") or share the photo as JPEG.', { fields: { file: 'HEIC is not supported; use JPEG' } })
  if (!kind) throw httpError(415, 'Invalid body: file — send a JPEG, PNG or WebP photo', { fields: { file: 'Send a JPEG, PNG or WebP photo' } })
  let full: { data: Buffer, info: OutputInfo }
  let thumb: Buffer
  try {
    // rotate() applies the EXIF orientation; without withMetadata() sharp writes no EXIF at all.
    full = await sharp(input.data, { failOn: 'error' }).rotate().resize({ width: 1600, height: 1600, fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 82, mozjpeg: true }).toBuffer({ resolveWithObject: true })
    thumb = await sharp(full.data).resize({ width: 320, height: 320, fit: 'inside' }).jpeg({ quality: 75 }).toBuffer()
  }
  catch {
    throw httpError(422, 'Invalid body: file — the image could not be read (it may be damaged)', { fields: { file: 'The image could not be read' } })
  }
  const storage = useStorage('uploads')
  await storage.setItemRaw(fullKey(input.id), full.data)
  await storage.setItemRaw(thumbKey(input.id), thumb)
  const write = async (t: Tx) => {
    const [row] = await t.insert(photos).values({
      id: input.id, companyId: actor.companyId, visitId: owner.visitId, requestId: owner.requestId, customerId: owner.customerId, featureId: owner.featureId,
      contentType: 'image/jpeg', width: full.info.width, height: full.info.height, bytes: full.data.length, caption: input.caption, uploadedBy: actor.id,
    }).returning()
    await recordAudit(t, { action: audit.action, companyId: actor.companyId, actorUserId: actor.id, subjectType: audit.subjectType, subjectId: audit.subjectId, ip: audit.ip, detail: { photoId: input.id } })
    return row!
  }
  try {
    return tx ? await write(tx) : await useDb().transaction(write)
  }
  catch (err) {
    await storage.removeItem(fullKey(input.id))
    await storage.removeItem(thumbKey(input.id))
    throw err
  }
}

/** A photo's bytes, for staff of the company or the customer it belongs to; 404 otherwise. */
export async function readPhoto(actor: SessionUser, id: string, size: 'full' | 'thumb') {
  const [p] = await useDb().select().from(photos).where(and(eq(photos.id, id), eq(photos.companyId, actor.companyId))).limit(1)
  if (!p || (!isStaff(actor) && p.customerId !== actor.customerId)) throw httpError(404, 'No such photo')
  const data = await useStorage('uploads').getItemRaw<Buffer>(size === 'thumb' ? thumbKey(id) : fullKey(id))
  if (!data) throw httpError(404, 'The photo file is missing')
  return { data, contentType: p.contentType }
}
