import { randomUUID } from 'node:crypto'
import { createWriteStream } from 'node:fs'
import { rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { pipeline } from 'node:stream/promises'
import busboy from 'busboy'
import type { H3Event } from 'h3'
import type { z } from 'zod'
import { fieldErrors } from '../../shared/utils/field-errors'
import { bodyTooLarge, isTooLarge, MAX_PHOTO_BYTES, requestBodyStream } from './body-limit'
import { httpError } from './errors'

/** An uploaded photo kept in a temporary file until the response is sent. */
export interface PhotoFile {
  path: string
  bytes: number
  /** The first bytes, to tell the type from. */
  head: Buffer
}

const HEAD_BYTES = 16

const notMultipart = () => httpError(400, 'Invalid body: send the photo as multipart/form-data', { fields: { file: 'Missing' } })

/** Where uploads wait for processing: RILLBOOK_UPLOAD_TMP or the system's temporary folder. */
function uploadTmpPath() {
  return join(process.env.RILLBOOK_UPLOAD_TMP || tmpdir(), `rillbook-upload-${randomUUID()}`)
}

/**
 * One photo sent as multipart/form-data: the `file` part and the text parts parsed by `schema`.
 * The body is streamed: the file goes to a temporary file (removed when the response is done)
 * while its bytes are counted, so a photo past 15 MB is a 413 as soon as the limit is passed,
 * with or without Content-Length. A missing file or a bad field is a 400 naming it.
 */
export async function readPhotoUpload<S extends z.ZodType>(event: H3Event, schema: S): Promise<{ file: PhotoFile, fields: z.output<S> }> {
  const contentType = getRequestHeader(event, 'content-type') ?? ''
  if (!/^multipart\/form-data\b/i.test(contentType)) throw notMultipart()
  let parser: busboy.Busboy
  try {
    parser = busboy({
      headers: event.node.req.headers,
      limits: { fileSize: MAX_PHOTO_BYTES, files: 1, fields: 10, fieldSize: 4096, fieldNameSize: 100, parts: 12, headerPairs: 20 },
    })
  }
  catch {
    throw notMultipart()
  }
  const path = uploadTmpPath()
  event.node.res.once('close', () => {
    void rm(path, { force: true })
  })
  const body = requestBodyStream(event)
  const text: Record<string, string> = {}
  let file: PhotoFile | null = null
  await new Promise<void>((resolve, reject) => {
    let settled = false
    let writing: Promise<void> = Promise.resolve()
    const fail = (err: unknown) => {
      if (settled) return
      settled = true
      body.unpipe(parser)
      reject(isTooLarge(err) ? bodyTooLarge(event, MAX_PHOTO_BYTES) : (err as { statusCode?: number })?.statusCode ? err : notMultipart())
    }
    parser.on('field', (name, value, info) => {
      if (info.valueTruncated || info.nameTruncated) fail(httpError(400, `Invalid body: ${name.slice(0, 100)} — too long`, { fields: { [name.slice(0, 100)]: 'Too long' } }))
      else text[name] = value
    })
    parser.on('file', (name, stream, info) => {
      if (name !== 'file' || file || info.filename === undefined) {
        stream.resume()
        return
      }
      const found: PhotoFile = { path, bytes: 0, head: Buffer.alloc(0) }
      file = found
      const head: Buffer[] = []
      stream.on('data', (chunk: Buffer) => {
        if (found.bytes < HEAD_BYTES) head.push(chunk.subarray(0, HEAD_BYTES - found.bytes))
        found.bytes += chunk.length
      })
      stream.once('limit', () => fail(bodyTooLarge(event, MAX_PHOTO_BYTES)))
      writing = pipeline(stream, createWriteStream(path, { flags: 'wx', mode: 0o600 })).then(() => {
        found.head = Buffer.concat(head)
      })
      writing.catch(fail)
    })
    parser.once('error', fail)
    parser.once('close', () => {
      writing.then(() => {
        if (settled) return
        settled = true
        resolve()
      }, fail)
    })
    body.once('error', fail)
    body.pipe(parser)
  })
  const upload = file as PhotoFile | null
  if (!upload?.bytes) throw httpError(400, 'Invalid body: file — choose a photo', { fields: { file: 'Choose a photo' } })
  const parsed = schema.safeParse(text)
  if (!parsed.success) throw httpError(400, `Invalid body: ${parsed.error.issues[0]!.path.join('.')} — ${parsed.error.issues[0]!.message}`, { fields: fieldErrors(parsed.error) })
  return { file: upload, fields: parsed.data }
}
