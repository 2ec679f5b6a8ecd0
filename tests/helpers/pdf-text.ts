// Text of the PDFs pdfkit writes uncompressed (the invoice): glyph codes of embedded fonts mapped
// back through each font's ToUnicode CMap, built-in fonts read as WinAnsi bytes, one BT … ET
// block per line of text; compressed streams are inflated.

import { inflateSync } from 'node:zlib'

export interface Fragment { x: number, y: number, size: number, font: string, text: string }

const WIN_ANSI: Record<number, string> = { 0x91: '‘', 0x92: '’', 0x93: '“', 0x94: '”', 0x95: '•', 0x96: '–', 0x97: '—', 0x80: '€' }

export function readPages(pdf: Buffer): Fragment[][] {
  const s = pdf.toString('latin1')
  const objects = new Map<number, string>()
  for (const m of s.matchAll(/(\d+) 0 obj\n([\s\S]*?)\nendobj/g)) objects.set(Number(m[1]), m[2]!)
  // A compressed stream (/FlateDecode, as the server sends it) is inflated first.
  const stream = (body: string) => {
    const raw = /stream\n([\s\S]*?)\nendstream/.exec(body)?.[1] ?? ''
    return /\/Filter\s*\/FlateDecode/.test(body) ? inflateSync(Buffer.from(raw, 'latin1')).toString('latin1') : raw
  }
  const ref = (body: string, key: string) => Number(new RegExp(`/${key} (\\d+) 0 R`).exec(body)?.[1])
  const pagesObject = [...objects.values()].find(b => /\/Type \/Pages\b/.test(b))!
  const kids = [.../\/Kids \[([^\]]*)\]/.exec(pagesObject)![1]!.matchAll(/(\d+) 0 R/g)].map(m => Number(m[1]))
  return kids.map((pageId) => {
    const page = objects.get(pageId)!
    const resources = objects.get(ref(page, 'Resources'))!
    const fonts = new Map<string, { name: string, decode: (hex: string) => string }>()
    for (const m of (/\/Font <<([\s\S]*?)>>/.exec(resources)?.[1] ?? '').matchAll(/\/(F\d+) (\d+) 0 R/g)) {
      const font = objects.get(Number(m[2]))!
      const name = /\/BaseFont \/(\S+)/.exec(font)![1]!
      const toUnicode = ref(font, 'ToUnicode')
      if (Number.isNaN(toUnicode)) {
        fonts.set(m[1]!, { name, decode: hex => (hex.match(/../g) ?? []).map((h) => { const c = Number.parseInt(h, 16); return WIN_ANSI[c] ?? String.fromCharCode(c) }).join('') })
        continue
      }
      const glyphs = new Map<number, string>()
      for (const r of stream(objects.get(toUnicode)!).matchAll(/<([0-9a-f]{4})> <[0-9a-f]{4}> \[([^\]]*)\]/g)) {
        const start = Number.parseInt(r[1]!, 16)
        ;[...r[2]!.matchAll(/<([0-9a-f ]+)>/g)].forEach((e, i) => glyphs.set(start + i, String.fromCharCode(...e[1]!.split(' ').map(h => Number.parseInt(h, 16)))))
      }
      fonts.set(m[1]!, { name, decode: hex => (hex.match(/.{4}/g) ?? []).map(h => glyphs.get(Number.parseInt(h, 16)) ?? '\uFFFD').join('') })
    }
    const out: Fragment[] = []
    for (const bt of stream(objects.get(ref(page, 'Contents'))!).matchAll(/BT\n([\s\S]*?)\nET/g)) {
      const tm = /1 0 0 1 (\S+) (\S+) Tm/.exec(bt[1]!)!
      const tf = /\/(F\d+) (\S+) Tf/.exec(bt[1]!)!
      const font = fonts.get(tf[1]!)!
      const hex = [...bt[1]!.matchAll(/<([0-9a-f]*)>/g)].map(h => h[1]).join('')
      // y from the top of the page, at the baseline.
      out.push({ x: Number(tm[1]), y: 792 - Number(tm[2]), size: Number(tf[2]), font: font.name, text: font.decode(hex) })
    }
    return out
  })
}


/** All the text of a PDF, one drawn line per line, page after page. */
export function pdfText(pdf: Buffer): string {
  return readPages(pdf).map(page => page.map(f => f.text).join('\n')).join('\n')
}
