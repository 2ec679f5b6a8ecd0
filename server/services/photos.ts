import { and, eq, sql } from 'drizzle-orm'
import pLimit from 'p-limit'
import sharp from 'sharp'
import { photos, visits, waterFeatures } from '../db/schema'
import { isStaff, type SessionUser } from '../utils/auth'
import { MAX_PHOTO_BYTES } from '../utils/body-limit'
import { useDb, type Tx } from '../utils/db'
import { httpError } from '../utils/errors'
import type { PhotoFile } from '../utils/photo-upload'
import { recordAudit } from './audit'
import { thumbKey } from './visit-report'

const fullKey = (id: string) => `photos/${id}/full.jpg`

/** The most pixels a photo may have (a 48-megapixel phone camera fits); larger is refused before decoding. */
export const MAX_PHOTO_PIXELS = 50_000_000

// Memory for images is bounded three ways: libvips keeps no cache of past operations (every
// photo is new), each image is worked on by one thread, and at most IMAGE_SLOTS photos are
// decoded at once (the rest wait their turn). Each decode reads the file sequentially and JPEGs
// shrink while loading, so a photo never sits in memory at full size.
sharp.cache(false)
sharp.concurrency(1)
const IMAGE_SLOTS = Math.max(1, Number(process.env.RILLBOOK_IMAGE_CONCURRENCY) || 2)
const imageSlot = pLimit(IMAGE_SLOTS)

/** Re-encodes a photo file to a JPEG of at most 1600 px without metadata, and its 320 px thumbnail. */
async function encodePhoto(path: string) {
  return imageSlot(async () => {
    try {
      // rotate() applies the EXIF orientation; without withMetadata() sharp writes no EXIF at all.
      const full = await sharp(path, { failOn: 'error', limitInputPixels: MAX_PHOTO_PIXELS, sequentialRead: true })
        .rotate().resize({ width: 1600, height: 1600, fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 82, mozjpeg: true }).toBuffer({ resolveWithObject: true })
      const thumb = await sharp(full.data, { sequentialRead: true }).resize({ width: 320, height: 320, fit: 'inside' }).jpeg({ quality: 75 }).toBuffer()
      return { full, thumb }
    }
    catch (err) {
      if (/pixel limit/i.test(String((err as Error)?.message))) throw httpError(413, `Invalid body: file — photos may have at most ${MAX_PHOTO_PIXELS / 1_000_000} megapixels`, { fields: { file: `At most ${MAX_PHOTO_PIXELS / 1_000_000} megapixels` } })
      throw httpError(422, 'Invalid body: file — the image could not be read (it may be damaged)', { fields: { file: 'The image could not be read' } })
    }
  })
}

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
 * Uploading the same id again (or twice at once) returns the stored photo.
 */
export async function addVisitPhoto(actor: SessionUser, visitId: string, input: { id: string, file: PhotoFile, featureId?: string | null, caption: string }, ip: string) {
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
 * (EXIF, including the location, is gone) and makes the thumbnail. The same photo id stored
 * twice at once (a phone retrying) is one photo: a lock on the id serialises the writes, and the
 * later one answers with the row the first wrote. `check` runs inside that transaction before
 * anything is written. A failed write removes the files it wrote.
 */
export async function storePhoto(
  actor: SessionUser,
  owner: { visitId: string | null, requestId: string | null, customerId: string, featureId: string | null },
  input: { id: string, file: PhotoFile, caption: string },
  audit: { action: string, subjectType: string, subjectId: string, ip: string },
  check?: (tx: Tx) => Promise<void>,
) {
  if (input.file.bytes > MAX_PHOTO_BYTES) throw httpError(413, `Invalid body: file — photos may be at most 15 MB (this one is ${(input.file.bytes / 1048576).toFixed(1)} MB)`, { fields: { file: 'At most 15 MB' } })
  const kind = sniffImageType(input.file.head)
  if (kind === 'heic') throw httpError(415, 'Invalid body: file — HEIC photos cannot be converted here. Set the camera to JPEG ("most compatible") or share the photo as JPEG.', { fields: { file: 'HEIC is not supported; use JPEG' } })
  if (!kind) throw httpError(415, 'Invalid body: file — send a JPEG, PNG or WebP photo', { fields: { file: 'Send a JPEG, PNG or WebP photo' } })
  const { full, thumb } = await encodePhoto(input.file.path)
  const storage = useStorage('uploads')
  let wrote = false
  try {
    return await useDb().transaction(async (tx) => {
      await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`photo:${input.id}`}))`)
      const [existing] = await tx.select().from(photos).where(eq(photos.id, input.id)).limit(1)
      if (existing) {
        if (existing.companyId !== actor.companyId || existing.visitId !== owner.visitId || existing.requestId !== owner.requestId) throw httpError(409, 'A photo with this id belongs to something else')
        return existing
      }
      await check?.(tx)
      wrote = true
      await storage.setItemRaw(fullKey(input.id), full.data)
      await storage.setItemRaw(thumbKey(input.id), thumb)
      const [row] = await tx.insert(photos).values({
        id: input.id, companyId: actor.companyId, visitId: owner.visitId, requestId: owner.requestId, customerId: owner.customerId, featureId: owner.featureId,
        contentType: 'image/jpeg', width: full.info.width, height: full.info.height, bytes: full.data.length, caption: input.caption, uploadedBy: actor.id,
      }).returning()
      await recordAudit(tx, { action: audit.action, companyId: actor.companyId, actorUserId: actor.id, subjectType: audit.subjectType, subjectId: audit.subjectId, ip: audit.ip, detail: { photoId: input.id } })
      return row!
    })
  }
  catch (err) {
    // Only this call's files: under the id's lock no row had them, so nobody else's are removed.
    if (wrote) {
      await storage.removeItem(fullKey(input.id))
      await storage.removeItem(thumbKey(input.id))
    }
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
