import fsDriver from 'unstorage/drivers/fs-lite'
import s3Driver from 'unstorage/drivers/s3'

const S3_SETTINGS = ['RILLBOOK_S3_ENDPOINT', 'RILLBOOK_S3_BUCKET', 'RILLBOOK_S3_ACCESS_KEY_ID', 'RILLBOOK_S3_SECRET_ACCESS_KEY'] as const

/**
 * Mounts the `uploads` storage: files under .data/uploads by default, or an S3-compatible
 * bucket when RILLBOOK_UPLOADS_DRIVER=s3 (endpoint, bucket, region and keys from the env; the
 * bucket is addressed path-style, endpoint/bucket/key). Every instance of a deployment with more
 * than one must use the bucket: a folder is seen only by the machine it is on.
 */
export default defineNitroPlugin(() => {
  const storage = useStorage()
  const driver = process.env.RILLBOOK_UPLOADS_DRIVER || 'fs'
  if (driver === 's3') {
    const missing = S3_SETTINGS.filter(name => !process.env[name])
    if (missing.length) throw new Error(`RILLBOOK_UPLOADS_DRIVER=s3 needs ${missing.join(', ')}`)
    storage.mount('uploads', s3Driver({
      endpoint: process.env.RILLBOOK_S3_ENDPOINT!,
      bucket: process.env.RILLBOOK_S3_BUCKET!,
      region: process.env.RILLBOOK_S3_REGION || 'auto',
      accessKeyId: process.env.RILLBOOK_S3_ACCESS_KEY_ID!,
      secretAccessKey: process.env.RILLBOOK_S3_SECRET_ACCESS_KEY!,
    }))
  }
  else if (driver === 'fs') {
    storage.mount('uploads', fsDriver({ base: process.env.RILLBOOK_UPLOADS_DIR || '.data/uploads' }))
  }
  else throw new Error(`RILLBOOK_UPLOADS_DRIVER must be fs or s3 (got "${driver}")`)
})
