import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'
import { caughtMail, startCatcher, stopCatcher, waitForMail } from '../helpers/mail'
import { visitForTessToday } from '../helpers/visits'

let tess: string
let owner: string
beforeAll(async () => {
  tess = await tokenFor(demo.tess)
  owner = await tokenFor(demo.owner)
})

const reading = (featureId: string, values: Record<string, unknown>) => ({ id: randomUUID(), featureId, takenAt: new Date().toISOString(), ammoniaBasis: 'N', ...values })

async function uploadPhoto(visitId: string, data: Buffer, id = randomUUID(), name = 'photo.jpg', type = 'image/jpeg') {
  const form = new FormData()
  form.append('id', id)
  form.append('file', new Blob([new Uint8Array(data)], { type }), name)
  const res = await fetch(`${baseUrl()}/api/visits/${visitId}/photos`, { method: 'POST', body: form, headers: { authorization: `Bearer ${tess}` } })
  return { status: res.status, body: await res.json().catch(() => null) }
}

describe('running a visit', () => {
  it('starts, records two water tests and a dose idempotently, and evaluates each reading', async () => {
    const v = await visitForTessToday('record')
    expect((await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { checklist: [], readings: [], doses: [] } })).status).toBe(409)
    const started = await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
    expect(started.body.visit.status).toBe('in_progress')
    expect(started.body.visit.startedAt).toBeTruthy()
    expect(started.body.features[0].volumeL).toBeCloseTo(14_400, 0)
    const record = {
      checklist: [{ label: 'Skimmer emptied', state: 'done' }, { label: 'Water tested', state: 'problem', note: 'Nitrite showing' }],
      customerNotes: 'Fish look lively.', internalNotes: 'Gate sticks.',
      readings: [
        reading(v.featureId, { temperatureC: 24, pH: 8.0, totalAmmoniaMgL: 1.0, nitriteMgL: 0.3 }),
        reading(v.featureId, { temperatureC: 24, pH: 7.4, khMgL: 140 }),
      ],
      doses: [{ id: randomUUID(), featureId: v.featureId, productName: 'Top-up water', isTopUp: true, amount: 200, unit: 'L', dosedAt: new Date().toISOString() }],
    }
    const saved = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: record })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    expect(saved.body.readings).toHaveLength(2)
    const first = saved.body.readings.find((r: { id: string }) => r.id === record.readings[0]!.id)
    // UF/IFAS FA16 worked example (Emerson et al. 1975): 24 °C, pH 8.0, TAN 1.0 mg/L as N → 0.0502 mg/L NH3-N = 0.0610 as NH3.
    expect(first.nh3MgL).toBeCloseTo(0.0502 * 17.031 / 14.007, 3)
    expect(first.overall).toBe('act')
    // Sent again (a retry from a back yard): nothing doubles.
    const again = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: record })
    expect(again.body.readings).toHaveLength(2)
    expect(again.body.doses).toHaveLength(1)
    // Bad values are 400 naming the field; another visit's feature is refused.
    const bad = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { ...record, readings: [reading(v.featureId, { pH: 15 })] } })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toContain('readings.0.pH')
    const foreign = await api(`/api/visits/${v.visitId}/record`, { method: 'PUT', token: tess, body: { ...record, readings: [reading(randomUUID(), { pH: 7 })] } })
    expect(foreign.status).toBe(400)
    expect((await api(`/api/visits/${v.visitId}/record`, { token: await tokenFor(demo.dario) })).status).toBe(403)
    // History: the feature's readings, sortable and as CSV.
    const hist = await api(`/api/features/${v.featureId}/readings?sort=pH&dir=asc`, { token: owner })
    expect(hist.body.rows.map((r: { pH: number }) => r.pH)).toEqual([7.4, 8.0])
    const csv = await fetch(`${baseUrl()}/api/features/${v.featureId}/readings?format=csv`, { headers: { authorization: `Bearer ${owner}` } })
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    const lines = (await csv.text()).trim().split('\r\n')
    // Headed by the catalogue's labels in the company's units (a US company).
    expect(lines[0]).toMatch(/^Taken at,Entered by,Water temperature \(°F\),pH,/)
    expect(lines).toHaveLength(3)
    // Values in the same units: 24 °C = 24 × 1.8 + 32 = 75.2 °F (exact definition).
    expect(lines.slice(1).map(l => l.split(',')[2])).toEqual(['75.2', '75.2'])
  })

  it('checks photos from their bytes, strips EXIF, stores a thumbnail; bad uploads are refused and nothing is kept', async () => {
    const v = await visitForTessToday('photos')
    await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
    const jpeg = await sharp({ create: { width: 1200, height: 900, channels: 3, background: '#4a9' } })
      .withExif({ IFD0: { Make: 'TestCamera' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '44/1 8/1 0/1' } }).jpeg().toBuffer()
    expect((await sharp(jpeg).metadata()).exif).toBeTruthy()
    const id = randomUUID()
    const ok = await uploadPhoto(v.visitId, jpeg, id)
    expect(ok.status, JSON.stringify(ok.body)).toBe(201)
    const again = await uploadPhoto(v.visitId, jpeg, id)
    expect(again.body.id).toBe(id)
    const full = await fetch(`${baseUrl()}/api/photos/${id}`, { headers: { authorization: `Bearer ${owner}` } })
    const stored = Buffer.from(await full.arrayBuffer())
    expect((await sharp(stored).metadata()).exif).toBeUndefined()
    const thumb = await fetch(`${baseUrl()}/api/photos/${id}?size=thumb`, { headers: { authorization: `Bearer ${owner}` } })
    expect((await sharp(Buffer.from(await thumb.arrayBuffer())).metadata()).width).toBeLessThanOrEqual(320)
    // Another customer cannot see it; a PNG renamed .jpg is fine (the bytes decide).
    expect((await fetch(`${baseUrl()}/api/photos/${id}`, { headers: { authorization: `Bearer ${await tokenFor(demo.priya)}` } })).status).toBe(404)
    const png = await sharp({ create: { width: 50, height: 50, channels: 3, background: '#fff' } }).png().toBuffer()
    expect((await uploadPhoto(v.visitId, png, randomUUID(), 'actually.jpg')).status).toBe(201)

    const before = (await api(`/api/visits/${v.visitId}/record`, { token: tess })).body.photos.length
    const text = await uploadPhoto(v.visitId, Buffer.from('hello, not an image'), randomUUID(), 'photo.jpg')
    expect(text.status).toBe(415)
    expect(text.body.data.fields.file).toBeTruthy()
    const heic = Buffer.concat([Buffer.from([0, 0, 0, 0x18]), Buffer.from('ftypheic'), Buffer.alloc(64)])
    const h = await uploadPhoto(v.visitId, heic, randomUUID(), 'IMG_0001.HEIC', 'image/heic')
    expect(h.status).toBe(415)
    expect(h.body.message).toMatch(/HEIC/)
    const corrupt = Buffer.concat([Buffer.from([0xFF, 0xD8, 0xFF, 0xE0]), Buffer.alloc(2000, 7)])
    expect((await uploadPhoto(v.visitId, corrupt)).status).toBe(422)
    const huge = Buffer.concat([Buffer.from([0xFF, 0xD8, 0xFF]), Buffer.alloc(15 * 1024 * 1024 + 10)])
    expect((await uploadPhoto(v.visitId, huge)).status).toBe(413)
    expect((await api(`/api/visits/${v.visitId}/record`, { token: tess })).body.photos.length).toBe(before)
  })

  it('finishing sends the report to the customer\'s report contacts with the readings, doses and next visit', async () => {
    const v = await visitForTessToday('report')
    await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
    const jpeg = await sharp({ create: { width: 400, height: 300, channels: 3, background: '#369' } }).jpeg().toBuffer()
    await uploadPhoto(v.visitId, jpeg)
    const record = {
      checklist: [{ label: 'Skimmer emptied', state: 'done' }, { label: 'Water tested', state: 'done' }],
      customerNotes: 'Lilies trimmed back.',
      readings: [reading(v.featureId, { temperatureC: 22, pH: 7.6, khMgL: 60, dissolvedOxygenMgL: 8 })],
      doses: [{ id: randomUUID(), featureId: v.featureId, productName: 'Sodium bicarbonate (KH buffer)', amount: 250, unit: 'g', dosedAt: new Date().toISOString() }],
    }
    const done = await api(`/api/visits/${v.visitId}/finish`, { method: 'POST', token: tess, body: { record } })
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    expect(done.body.visit.status).toBe('done')
    expect(done.body.visit.finishedAt).toBeTruthy()
    const mail = await waitForMail(m => m.to.includes(v.reportTo))
    expect(mail.subject).toMatch(/Routine maintenance report/)
    expect(mail.text).toContain('pH 7.6')
    expect(mail.text).toMatch(/KH 60 mg\/L .*below/)
    // In the company's units (US): 250 g / 28.349523125 g per oz (NIST Handbook 44) = 8.8 oz, measured out to the half ounce.
    expect(mail.text).toContain('Sodium bicarbonate (KH buffer) — 9 oz')
    expect(mail.text).not.toMatch(/\b250 g\b|°C/)
    expect(mail.text).toContain('Lilies trimmed back.')
    expect(mail.text).toMatch(/GFCI\/RCD/)
    expect(mail.html).toMatch(/<img src="(cid:photo-|data:image\/jpeg)/)
    expect(mail.attachments.some(a => a.contentType === 'image/jpeg')).toBe(true)
    // Finishing twice sends nothing more.
    await api(`/api/visits/${v.visitId}/finish`, { method: 'POST', token: tess, body: {} })
    await api('/api/outbox/flush', { method: 'POST', token: owner, body: { retryNow: true } })
    expect(caughtMail().filter(m => m.to.includes(v.reportTo))).toHaveLength(1)
  })

  it('with the mail catcher down, the report waits in the outbox and goes once it is back', async () => {
    const v = await visitForTessToday('outage')
    await api(`/api/visits/${v.visitId}/start`, { method: 'POST', token: tess })
    await stopCatcher()
    try {
      const done = await api(`/api/visits/${v.visitId}/finish`, { method: 'POST', token: tess, body: { record: { checklist: [], readings: [reading(v.featureId, { pH: 7.2 })], doses: [] } } })
      expect(done.status).toBe(200)
      await new Promise(r => setTimeout(r, 500))
      const pending = (await api('/api/outbox?status=pending&pageSize=100', { token: owner })).body.rows
      const row = pending.find((r: { to: string[] }) => r.to.includes(v.reportTo))
      expect(row).toBeTruthy()
      expect(caughtMail().some(m => m.to.includes(v.reportTo))).toBe(false)
    }
    finally {
      await startCatcher()
    }
    await api('/api/outbox/flush', { method: 'POST', token: owner, body: { retryNow: true } })
    await waitForMail(m => m.to.includes(v.reportTo))
    await api('/api/outbox/flush', { method: 'POST', token: owner, body: { retryNow: true } })
    expect(caughtMail().filter(m => m.to.includes(v.reportTo))).toHaveLength(1)
  })

  it('skipping needs a reason; the product catalogue is the owner\'s', async () => {
    const v = await visitForTessToday('skip')
    expect((await api(`/api/visits/${v.visitId}/skip`, { method: 'POST', token: tess, body: {} })).status).toBe(400)
    const s = await api(`/api/visits/${v.visitId}/skip`, { method: 'POST', token: tess, body: { reason: 'Gate locked' } })
    expect(s.body.visit.status).toBe('skipped')
    const product = { name: 'Test barley extract', kind: 'other', labelAmount: 10, labelUnit: 'mL', labelPerLitres: 1000 }
    expect((await api('/api/products', { method: 'POST', token: tess, body: product })).status).toBe(403)
    const created = await api('/api/products', { method: 'POST', token: owner, body: product })
    expect(created.status).toBe(201)
    const badRate = await api('/api/products', { method: 'POST', token: owner, body: { ...product, labelPerLitres: 0 } })
    expect(badRate.status).toBe(400)
    expect(badRate.body.data.fields.labelPerLitres).toBeTruthy()
    const archived = await api(`/api/products/${created.body.id}`, { method: 'PATCH', token: owner, body: { archived: true } })
    expect(archived.body.archivedAt).toBeTruthy()
  })
})
