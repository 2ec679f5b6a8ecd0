import { describe, expect, it } from 'vitest'
import { api, baseUrl, demo, tokenFor } from '../helpers/api'

describe('each role reaches its home data', () => {
  it('owner overview counts what the demo company has on record', async () => {
    const r = await api('/api/overview', { token: await tokenFor(demo.owner) })
    expect(r.status).toBe(200)
    // Demo scenario: thirty-odd customers, two technicians (more may be added by other tests).
    expect(r.body.activeCustomers).toBeGreaterThanOrEqual(30)
    expect(r.body.technicians).toBeGreaterThanOrEqual(2)
    expect(r.body.customerSignIns).toBeGreaterThanOrEqual(30)
  })

  it('technician gets today in the company time zone', async () => {
    const r = await api('/api/today', { token: await tokenFor(demo.tess) })
    expect(r.status).toBe(200)
    expect(r.body.date).toMatch(/^\d{4}-\d{2}-\d{2}$/)
    expect(r.body.timeZone).toBe('America/Chicago')
    expect(r.body.technician.name).toBe('Tess Okafor')
  })

  it('customer lists only their own customer record', async () => {
    const priya = await api('/api/customers', { token: await tokenFor(demo.priya) })
    expect(priya.status).toBe(200)
    expect(priya.body.rows.map((r: { name: string }) => r.name)).toEqual(['Priya Whitcombe'])
    const ash = await api('/api/customers', { token: await tokenFor(demo.ashgrove) })
    expect(ash.body.rows.map((r: { name: string }) => r.name)).toEqual(['Ashgrove Community Garden'])
    expect(ash.body.rows[0].kind).toBe('public')
  })
})

describe('pages', () => {
  it('an anonymous visit to a private page redirects to sign-in', async () => {
    for (const path of ['/', '/today', '/portal', '/settings/people']) {
      const r = await fetch(`${baseUrl()}${path}`, { redirect: 'manual' })
      expect(r.status, path).toBe(302)
      expect(r.headers.get('location'), path).toMatch(/^\/login/)
    }
  })

  it('the sign-in page is public and references only local files (fonts ship with the app)', async () => {
    const r = await fetch(`${baseUrl()}/login`)
    expect(r.status).toBe(200)
    const html = await r.text()
    const refs = [...html.matchAll(/(?:href|src)="([^"]+)"/g)].map(m => m[1]!)
    expect(refs.length).toBeGreaterThan(0)
    for (const ref of refs) expect(ref, ref).toMatch(/^\/(?!\/)/)
    const css = refs.filter(ref => ref.endsWith('.css'))
    expect(css.length).toBeGreaterThan(0)
    let fontFaces = 0
    for (const file of css) {
      const text = await (await fetch(`${baseUrl()}${file}`)).text()
      fontFaces += (text.match(/@font-face/g) ?? []).length
      for (const m of text.matchAll(/url\(([^)]+)\)/g)) {
        expect(m[1], `${file} → ${m[1]}`).not.toMatch(/^["']?(https?:)?\/\//)
      }
    }
    expect(fontFaces, 'Work Sans @font-face rules in the built CSS').toBeGreaterThan(0)
    expect(html).toContain('Rillbook')
  })

  it('an unknown API path is a JSON 404', async () => {
    const r = await api('/api/no-such-thing', { token: await tokenFor(demo.owner) })
    expect(r.status).toBe(404)
  })
})
