// Size limits that hold for bodies without Content-Length: a chunked body is counted while it is
// read and refused with 413 at the limit, on public routes (sign-in, the payment webhook) and on
// a signed-in photo upload, while the server's memory stays flat.
import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { postChunked, rssGrowthDuring } from '../helpers/memory'
import { visitForTessToday } from '../helpers/visits'

const MB = 1024 * 1024
/** What an oversized body may add to the server's resident memory. */
const FLAT_MB = 50

let tess: string
let visitId: string
beforeAll(async () => {
  tess = await tokenFor(demo.tess)
  const v = await visitForTessToday('body-limits')
  visitId = v.visitId
  const started = await api(`/api/visits/${visitId}/start`, { method: 'POST', token: tess })
  if (started.status !== 200) throw new Error(`could not start the visit: ${JSON.stringify(started.body)}`)
})

/** A multipart body's opening: the photo id field and the file part's header, then the file's bytes follow. */
function multipartOpening(boundary: string, id: string) {
  return Buffer.from(
    `--${boundary}\r\nContent-Disposition: form-data; name="id"\r\n\r\n${id}\r\n`
    + `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`
    + '\xFF\xD8\xFF', 'latin1')
}

describe('streaming body limits', () => {
  it('refuses a 400 MB chunked sign-in body with 413, without sign-in, and memory stays flat', async () => {
    const { result, growthMb } = await rssGrowthDuring(() => postChunked('/api/auth/login', {
      headers: { 'content-type': 'application/json', 'x-forwarded-for': '203.0.113.41' },
      prefix: Buffer.from('{"email":"mara@heronmere.example","password":"'),
      totalBytes: 400 * MB,
    }))
    expect(result.status, JSON.stringify(result.body)).toBe(413)
    expect(result.body.message).toMatch(/too large/i)
    expect(result.sentBytes).toBeLessThan(100 * MB)
    console.info(`a 400 MB chunked sign-in: 413 after ${(result.sentBytes / MB).toFixed(0)} MB sent, the server grew by ${growthMb.toFixed(1)} MB`)
    expect(growthMb, `the server grew by ${growthMb.toFixed(1)} MB`).toBeLessThan(FLAT_MB)
  })

  it('refuses a 400 MB chunked webhook body with 413 before verifying it, and memory stays flat', async () => {
    const { result, growthMb } = await rssGrowthDuring(() => postChunked('/api/webhooks/payments', {
      headers: { 'content-type': 'application/json', 'stripe-signature': 't=1,v1=00' },
      prefix: Buffer.from('{"id":"evt_big","object":"event","data":"'),
      totalBytes: 400 * MB,
    }))
    expect(result.status, JSON.stringify(result.body)).toBe(413)
    expect(result.body.message).toMatch(/too large/i)
    console.info(`a 400 MB chunked webhook: 413 after ${(result.sentBytes / MB).toFixed(0)} MB sent, the server grew by ${growthMb.toFixed(1)} MB`)
    expect(growthMb, `the server grew by ${growthMb.toFixed(1)} MB`).toBeLessThan(FLAT_MB)
  })

  it('refuses a signed-in 100 MB chunked photo upload with 413, and memory stays flat', async () => {
    const boundary = `----rillbook${randomUUID()}`
    const id = randomUUID()
    const { result, growthMb } = await rssGrowthDuring(() => postChunked(`/api/visits/${visitId}/photos`, {
      headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'authorization': `Bearer ${tess}` },
      prefix: multipartOpening(boundary, id),
      totalBytes: 100 * MB,
    }))
    expect(result.status, JSON.stringify(result.body)).toBe(413)
    expect(result.body.data.fields.file).toMatch(/15 MB/)
    console.info(`a 100 MB chunked photo: 413 after ${(result.sentBytes / MB).toFixed(0)} MB sent, the server grew by ${growthMb.toFixed(1)} MB`)
    expect(growthMb, `the server grew by ${growthMb.toFixed(1)} MB`).toBeLessThan(FLAT_MB)
    // Nothing was kept.
    expect((await api(`/api/visits/${visitId}/record`, { token: tess })).body.photos.map((p: { id: string }) => p.id)).not.toContain(id)
  })

  it('a declared Content-Length over the limit is refused before any byte is read', async () => {
    const res = await fetch(`${baseUrl()}/api/auth/login`, {
      method: 'POST', headers: { 'content-type': 'application/json', 'content-length': String(2 * MB) },
      body: new Uint8Array(2 * MB).fill(0x20),
    })
    expect(res.status).toBe(413)
  })

  it('ordinary chunked bodies still work: a sign-in and a photo', async () => {
    const signIn = await postChunked('/api/auth/login', {
      headers: { 'content-type': 'application/json' },
      prefix: Buffer.from(JSON.stringify({ email: demo.tess, password: 'demo-pond-2026' })),
      totalBytes: 0,
    })
    expect(signIn.status, JSON.stringify(signIn.body)).toBe(200)
    expect(signIn.body.token).toBeTruthy()
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#2a6' } }).jpeg().toBuffer()
    const boundary = `----rillbook${randomUUID()}`
    const id = randomUUID()
    const body = Buffer.concat([
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="id"\r\n\r\n${id}\r\n--${boundary}\r\nContent-Disposition: form-data; name="caption"\r\n\r\nSkimmer basket\r\n`),
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="a.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`),
      jpeg,
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ])
    const photo = await postChunked(`/api/visits/${visitId}/photos`, {
      headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, 'authorization': `Bearer ${tess}` },
      prefix: body,
      totalBytes: 0,
    })
    expect(photo.status, JSON.stringify(photo.body)).toBe(201)
    expect(photo.body).toMatchObject({ id, caption: 'Skimmer basket', width: 64, height: 48 })
  })

  it('a large real photo (12 megapixels, about 10 MB) is stored without the server growing by hundreds of MB', async () => {
    // Noise compresses badly, so a 12 MP JPEG at high quality is about 10 MB.
    const width = 4000
    const height = 3000
    const noise = Buffer.alloc(width * height * 3)
    for (let i = 0; i < noise.length; i += 4) noise.writeUInt32LE((Math.random() * 0xFFFFFFFF) >>> 0, i)
    const jpeg = await sharp(noise, { raw: { width, height, channels: 3 } }).jpeg({ quality: 90 }).toBuffer()
    expect(jpeg.length).toBeGreaterThan(8 * MB)
    expect(jpeg.length).toBeLessThan(15 * MB)
    const form = new FormData()
    const id = randomUUID()
    form.append('id', id)
    form.append('file', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'big.jpg')
    const { result, growthMb } = await rssGrowthDuring(async () => {
      const res = await fetch(`${baseUrl()}/api/visits/${visitId}/photos`, { method: 'POST', body: form, headers: { authorization: `Bearer ${tess}` } })
      return { status: res.status, body: await res.json() }
    })
    expect(result.status, JSON.stringify(result.body)).toBe(201)
    expect(result.body).toMatchObject({ id, width: 1600, height: 1200 })
    console.info(`a ${(jpeg.length / MB).toFixed(1)} MB photo: the server grew by ${growthMb.toFixed(1)} MB`)
    // Before the limits, one such photo raised the server by about 400 MB.
    expect(growthMb, `the server grew by ${growthMb.toFixed(1)} MB`).toBeLessThan(150)
  })

  it('twenty photos of about 5 MB uploaded at once are all stored, and the server stays within a bounded amount of memory', async () => {
    const width = 3000
    const height = 2000
    const noise = Buffer.alloc(width * height * 3)
    for (let i = 0; i < noise.length; i += 4) noise.writeUInt32LE((Math.random() * 0xFFFFFFFF) >>> 0, i)
    const jpeg = await sharp(noise, { raw: { width, height, channels: 3 } }).jpeg({ quality: 90 }).toBuffer()
    const upload = async () => {
      const form = new FormData()
      const id = randomUUID()
      form.append('id', id)
      form.append('file', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'photo.jpg')
      const res = await fetch(`${baseUrl()}/api/visits/${visitId}/photos`, { method: 'POST', body: form, headers: { authorization: `Bearer ${tess}` } })
      return { id, status: res.status, body: await res.json() }
    }
    const { result, growthMb } = await rssGrowthDuring(() => Promise.all(Array.from({ length: 20 }, upload)))
    for (const r of result) expect(r.status, JSON.stringify(r.body)).toBe(201)
    const stored = (await api(`/api/visits/${visitId}/record`, { token: tess })).body.photos.map((p: { id: string }) => p.id)
    for (const r of result) expect(stored).toContain(r.id)
    console.info(`twenty ${(jpeg.length / MB).toFixed(1)} MB photos at once: the server grew by ${growthMb.toFixed(1)} MB`)
    // Before the limits, twenty 5 MB photos at once peaked about 1 GB above the start.
    expect(growthMb, `the server grew by ${growthMb.toFixed(1)} MB`).toBeLessThan(300)
  }, 180_000)
})
