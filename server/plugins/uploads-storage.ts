import fsDriver from 'unstorage/drivers/fs-lite'
import s3Driver from 'unstorage/drivers/s3'

/**
 * Mounts the `uploads` storage: files under .data/uploads by default, or an S3-compatible
 * bucket when RILLBOOK_UPLOADS_DRIVER=s3 (endpoint, bucket, region and keys from the env).
 */
export default defineNitroPlugin(() => {
  const storage = useStorage()
  if (process.env.RILLBOOK_UPLOADS_DRIVER === 's3') {
    storage.mount('uploads', s3Driver({
      endpoint: process.env.RILLBOOK_S3_ENDPOINT!,
      bucket: process.env.RILLBOOK_S3_BUCKET!,
      region: process.env.RILLBOOK_S3_REGION || 'auto',
      accessKeyId: process.env.RILLBOOK_S3_ACCESS_KEY_ID!,
      secretAccessKey: process.env.RILLBOOK_S3_SECRET_ACCESS_KEY!,
    }))
  }
  else {
    storage.mount('uploads', fsDriver({ base: process.env.RILLBOOK_UPLOADS_DIR || '.data/uploads' }))
  }
})
