import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { join } from 'node:path'
import { inflateSync } from 'node:zlib'
import PDFDocument from 'pdfkit'
import type { InvoiceDocument } from '../../shared/types/billing'
import { INVOICE_STATUS_LABELS } from '../../shared/types/billing'
import { formatTaxRate } from '../../shared/utils/billing'
import { formatMoney } from '../../shared/utils/money'

/**
 * The printable invoice: lays out an `InvoiceDocument` (everything already computed) on US
 * Letter pages. Text is set in Work Sans, the product's font, read from the installed
 * `@fontsource/work-sans` package; when those files cannot be found (a bundle without
 * node_modules) it falls back to the PDF viewer's built-in Helvetica rather than failing.
 */

export interface InvoiceFonts { regular: Uint8Array, semibold: Uint8Array }

export interface RenderInvoicePdfOptions {
  /** Deflate the page content streams (default true). Tests turn it off to read the text. */
  compress?: boolean
  /**
   * undefined: Work Sans from the installed package (Helvetica when it cannot be found);
   * null: the built-in Helvetica pair; or given TrueType/OpenType/WOFF bytes (Helvetica when they do not parse).
   */
  fonts?: InvoiceFonts | null
}

// ——— Fonts ———

const FONT_PACKAGE = '@fontsource/work-sans'
const FONT_FILES = { regular: 'work-sans-latin-400-normal.woff', semibold: 'work-sans-latin-600-normal.woff' } as const

/** undefined until the first render tries; null when Work Sans could not be loaded. */
let cachedFonts: InvoiceFonts | null | undefined

function isWoff(bytes: Uint8Array): boolean {
  return bytes.length > 44 && bytes[0] === 0x77 && bytes[1] === 0x4F && bytes[2] === 0x46 && bytes[3] === 0x46 // 'wOFF'
}

/**
 * WOFF 1 → the plain TrueType/OpenType file it wraps. fontkit can read WOFF itself, but it
 * inflates a compressed table again on every access (the whole `glyf` table per glyph, in
 * JavaScript), which made one invoice take ~300 ms. Unwrapping once with zlib keeps a render
 * to a few tens of milliseconds.
 */
function woffToSfnt(woff: Uint8Array): Buffer {
  const src = Buffer.from(woff.buffer, woff.byteOffset, woff.byteLength)
  if (!isWoff(src)) throw new Error('not a WOFF file')
  const numTables = src.readUInt16BE(12)
  const tables: Array<{ tag: number, checksum: number, data: Buffer }> = []
  for (let i = 0; i < numTables; i++) {
    const at = 44 + i * 20
    const offset = src.readUInt32BE(at + 4)
    const compLength = src.readUInt32BE(at + 8)
    const origLength = src.readUInt32BE(at + 12)
    const raw = src.subarray(offset, offset + compLength)
    const data = compLength < origLength ? inflateSync(raw) : raw
    if (data.length !== origLength) throw new Error('damaged WOFF table')
    tables.push({ tag: src.readUInt32BE(at), checksum: src.readUInt32BE(at + 16), data })
  }
  tables.sort((a, b) => a.tag - b.tag)
  const pad4 = (n: number) => (n + 3) & ~3
  const headerLength = 12 + numTables * 16
  const out = Buffer.alloc(headerLength + tables.reduce((s, t) => s + pad4(t.data.length), 0))
  const entrySelector = Math.floor(Math.log2(numTables))
  const searchRange = 2 ** entrySelector * 16
  out.writeUInt32BE(src.readUInt32BE(4), 0) // flavor: the sfnt version
  out.writeUInt16BE(numTables, 4)
  out.writeUInt16BE(searchRange, 6)
  out.writeUInt16BE(entrySelector, 8)
  out.writeUInt16BE(numTables * 16 - searchRange, 10)
  let offset = headerLength
  tables.forEach((t, i) => {
    const at = 12 + i * 16
    out.writeUInt32BE(t.tag, at)
    out.writeUInt32BE(t.checksum, at + 4)
    out.writeUInt32BE(offset, at + 8)
    out.writeUInt32BE(t.data.length, at + 12)
    t.data.copy(out, offset)
    offset += pad4(t.data.length)
  })
  return out
}

function readFontFile(file: string): Buffer | null {
  const candidates: Array<() => string> = [
    () => createRequire(import.meta.url).resolve(`${FONT_PACKAGE}/files/${file}`),
    () => join(process.cwd(), 'node_modules', FONT_PACKAGE, 'files', file),
  ]
  for (const candidate of candidates) {
    try {
      const bytes = readFileSync(candidate())
      if (isWoff(bytes)) return bytes
    }
    catch {
      // Try the next place.
    }
  }
  return null
}

/** Font bytes as pdfkit should get them (WOFF unwrapped), or null when they do not parse. */
function prepareFonts(fonts: InvoiceFonts): InvoiceFonts | null {
  try {
    const prepared = {
      regular: isWoff(fonts.regular) ? woffToSfnt(fonts.regular) : fonts.regular,
      semibold: isWoff(fonts.semibold) ? woffToSfnt(fonts.semibold) : fonts.semibold,
    }
    // Open both faces once in a throwaway document, so a damaged file falls back instead of failing a render.
    const probe = new PDFDocument({ autoFirstPage: false, font: null as unknown as string })
    probe.font(prepared.regular).widthOfString('Invoice 0')
    probe.font(prepared.semibold).widthOfString('Invoice 0')
    return prepared
  }
  catch {
    return null
  }
}

function workSans(): InvoiceFonts | null {
  if (cachedFonts !== undefined) return cachedFonts
  const regular = readFontFile(FONT_FILES.regular)
  const semibold = readFontFile(FONT_FILES.semibold)
  cachedFonts = regular && semibold ? prepareFonts({ regular, semibold }) : null
  return cachedFonts
}

/** Given bytes (tests, or a caller with its own files) are prepared once per pair. */
const preparedGiven = new WeakMap<InvoiceFonts, InvoiceFonts | null>()
function givenFonts(fonts: InvoiceFonts): InvoiceFonts | null {
  if (!preparedGiven.has(fonts)) preparedGiven.set(fonts, prepareFonts(fonts))
  return preparedGiven.get(fonts)!
}

// ——— Formatting ———

const dateFormat = new Intl.DateTimeFormat('en-US', { dateStyle: 'medium', timeZone: 'UTC' })
const quantityFormat = new Intl.NumberFormat('en-US', { maximumFractionDigits: 2 })

/** "2026-12-02" → "Dec 2, 2026" (read as UTC midnight so no zone shifts the day). */
function formatDay(iso: string): string {
  const day = /^\d{4}-\d{2}-\d{2}/.exec(iso)?.[0]
  const date = day ? new Date(`${day}T00:00:00Z`) : null
  return date && !Number.isNaN(date.getTime()) ? dateFormat.format(date) : iso
}

// ——— Layout ———

const PAGE_MARGIN = 50
const INK = '#1f2933'
const MUTED = '#5b6770'
const RULE = '#d5dbe0'
const ACCENT = '#0f5c57'
const ALERT = '#a61b1b'

// Lines table columns (x offsets from the left margin; the page body is 512 pt wide on Letter).
const COL = {
  description: { x: 0, width: 250 },
  quantity: { x: 262, width: 60 },
  unitPrice: { x: 330, width: 88 },
  amount: { x: 424, width: 88 },
}

/** Renders the invoice to PDF bytes. Lays out only: every amount comes from `doc`. */
export async function renderInvoicePdf(doc: InvoiceDocument, opts: RenderInvoicePdfOptions = {}): Promise<Buffer> {
  const fonts = opts.fonts === undefined ? workSans() : opts.fonts === null ? null : givenFonts(opts.fonts)
  const title = doc.number ? `Invoice ${doc.number}` : 'Invoice being prepared'

  const pdf = new PDFDocument({
    size: 'LETTER',
    margin: PAGE_MARGIN,
    compress: opts.compress ?? true,
    bufferPages: true,
    // pdfkit opens this font in its constructor, Helvetica when the option is left out. null opens
    // none (it is typed as a string, but any falsy value skips it): with Work Sans the built-in
    // font data is never loaded, and the first font() below is the only time each face is parsed.
    font: fonts ? null as unknown as string : 'Helvetica',
    info: { Title: title, Author: doc.company.name },
  })
  pdf.registerFont('body', fonts ? fonts.regular : 'Helvetica')
  pdf.registerFont('bold', fonts ? fonts.semibold : 'Helvetica-Bold')
  pdf.font('body')

  const chunks: Buffer[] = []
  const done = new Promise<Buffer>((resolve, reject) => {
    pdf.on('data', (chunk: Buffer) => chunks.push(chunk))
    pdf.on('end', () => resolve(Buffer.concat(chunks)))
    pdf.on('error', reject)
  })

  const left = pdf.page.margins.left
  const right = pdf.page.width - pdf.page.margins.right
  const bodyWidth = right - left
  const money = (minor: number) => formatMoney(minor, doc.currency)

  /** One piece of text at (x, y); returns its height. */
  const put = (text: string, x: number, y: number, o: { width: number, font?: 'body' | 'bold', size?: number, color?: string, align?: 'left' | 'right' }) => {
    pdf.font(o.font ?? 'body').fontSize(o.size ?? 10).fillColor(o.color ?? INK)
    const options = { width: o.width, align: o.align ?? 'left', lineGap: 1 }
    pdf.text(text, x, y, options)
    return pdf.y - y
  }
  const rule = (y: number, color = RULE, width = 0.75) => {
    pdf.save().moveTo(left, y).lineTo(right, y).lineWidth(width).strokeColor(color).stroke().restore()
  }
  const bottom = () => pdf.page.height - pdf.page.margins.bottom

  // ——— Header: the company on the left, the invoice's identity on the right ———
  let y = pdf.page.margins.top
  const companyWidth = 280
  let leftY = y
  leftY += put(doc.company.name, left, leftY, { width: companyWidth, font: 'bold', size: 18 }) + 4
  for (const line of [...doc.company.addressLines, ...(doc.company.email ? [doc.company.email] : [])]) {
    leftY += put(line, left, leftY, { width: companyWidth, size: 9.5, color: MUTED })
  }

  const metaX = left + 300
  const metaWidth = bodyWidth - 300
  let rightY = y
  rightY += put('Invoice', metaX, rightY, { width: metaWidth, font: 'bold', size: 18, color: ACCENT, align: 'right' })
  rightY += put(doc.number ?? INVOICE_STATUS_LABELS.preparing, metaX, rightY, { width: metaWidth, font: 'bold', size: 11, align: 'right' }) + 8
  const meta: Array<[string, string]> = [['Status', INVOICE_STATUS_LABELS[doc.status]]]
  if (doc.issueDate) meta.push(['Issue date', formatDay(doc.issueDate)])
  if (doc.dueDate) meta.push(['Due date', formatDay(doc.dueDate)])
  if (doc.periodStart || doc.periodEnd) {
    const period = doc.periodStart && doc.periodEnd
      ? `${formatDay(doc.periodStart)} – ${formatDay(doc.periodEnd)}`
      : doc.periodStart ? `From ${formatDay(doc.periodStart)}` : `Until ${formatDay(doc.periodEnd!)}`
    meta.push(['Service period', period])
  }
  const labelWidth = 78
  for (const [label, value] of meta) {
    put(label, metaX, rightY, { width: labelWidth, size: 9.5, color: MUTED })
    rightY += Math.max(12, put(value, metaX + labelWidth, rightY, { width: metaWidth - labelWidth, size: 9.5, align: 'right' })) + 2
  }
  y = Math.max(leftY, rightY) + 22

  // ——— Cancelled notice ———
  if (doc.status === 'cancelled') {
    const text = 'CANCELLED — this invoice has been cancelled. No payment is due.'
    pdf.font('bold').fontSize(11)
    const h = pdf.heightOfString(text, { width: bodyWidth - 20 }) + 14
    pdf.save().rect(left, y, bodyWidth, h).lineWidth(1.5).strokeColor(ALERT).stroke().restore()
    put(text, left + 10, y + 7, { width: bodyWidth - 20, font: 'bold', size: 11, color: ALERT })
    y += h + 18
  }

  // ——— Bill to ———
  y += put('Bill to', left, y, { width: companyWidth, font: 'bold', size: 9, color: MUTED }) + 2
  y += put(doc.customer.name, left, y, { width: companyWidth, font: 'bold', size: 11 })
  for (const line of doc.customer.addressLines) y += put(line, left, y, { width: companyWidth, size: 10 })
  y += 22

  // ——— Lines ———
  const tableHeader = () => {
    const o = { font: 'bold' as const, size: 9, color: MUTED }
    put('Description', left + COL.description.x, y, { ...o, width: COL.description.width })
    put('Qty', left + COL.quantity.x, y, { ...o, width: COL.quantity.width, align: 'right' })
    put('Unit price', left + COL.unitPrice.x, y, { ...o, width: COL.unitPrice.width, align: 'right' })
    const h = put('Amount', left + COL.amount.x, y, { ...o, width: COL.amount.width, align: 'right' })
    y += h + 4
    rule(y, INK, 0.75)
    y += 6
  }
  const newPage = () => {
    pdf.addPage()
    y = pdf.page.margins.top
  }

  tableHeader()
  for (const line of doc.lines) {
    pdf.font('body').fontSize(10)
    const descHeight = pdf.heightOfString(line.description || ' ', { width: COL.description.width, lineGap: 1 })
    pdf.font('body').fontSize(8)
    const noteHeight = line.taxable ? 0 : pdf.heightOfString('no tax', { width: COL.description.width, lineGap: 1 }) + 1
    const rowHeight = Math.max(descHeight + noteHeight, 13)
    if (y + rowHeight + 6 > bottom()) {
      newPage()
      tableHeader()
    }
    put(line.description, left + COL.description.x, y, { width: COL.description.width })
    if (!line.taxable) put('no tax', left + COL.description.x, y + descHeight + 1, { width: COL.description.width, size: 8, color: MUTED })
    put(quantityFormat.format(line.quantity), left + COL.quantity.x, y, { width: COL.quantity.width, align: 'right' })
    put(money(line.unitPriceMinor), left + COL.unitPrice.x, y, { width: COL.unitPrice.width, align: 'right' })
    put(money(line.amountMinor), left + COL.amount.x, y, { width: COL.amount.width, align: 'right' })
    y += rowHeight + 3
    rule(y)
    y += 5
  }
  if (doc.lines.length === 0) {
    y += put('No lines.', left, y, { width: bodyWidth, color: MUTED }) + 8
  }

  // ——— Totals (kept together on one page) ———
  const totals: Array<{ label: string, value: string, strong?: boolean }> = [
    { label: 'Subtotal', value: money(doc.subtotalMinor) },
    { label: `Tax (${formatTaxRate(doc.taxRateBasisPoints)})`, value: money(doc.taxMinor) },
    { label: 'Total', value: money(doc.totalMinor), strong: true },
  ]
  if (doc.amountPaidMinor > 0) totals.push({ label: 'Paid', value: money(-doc.amountPaidMinor) })
  const totalsHeight = totals.length * 16 + 34
  y += 6
  if (y + totalsHeight > bottom()) newPage()
  const totalsX = left + 262
  const totalsLabelWidth = 150
  const totalsValueX = totalsX + totalsLabelWidth
  const totalsValueWidth = right - totalsValueX
  for (const t of totals) {
    const font = t.strong ? 'bold' as const : 'body' as const
    put(t.label, totalsX, y, { width: totalsLabelWidth, font })
    y += put(t.value, totalsValueX, y, { width: totalsValueWidth, font, align: 'right' }) + 4
  }
  pdf.save().moveTo(totalsX, y).lineTo(right, y).lineWidth(1).strokeColor(INK).stroke().restore()
  y += 6
  put('Amount due', totalsX, y, { width: totalsLabelWidth, font: 'bold', size: 12 })
  y += put(money(doc.amountDueMinor), totalsValueX - 40, y, { width: totalsValueWidth + 40, font: 'bold', size: 12, align: 'right' }) + 18

  // ——— Payment / status notes, then the invoice's own notes (these may flow onto new pages) ———
  const paragraph = (heading: string | null, text: string, color = INK) => {
    pdf.font('body').fontSize(10)
    const first = Math.min(pdf.heightOfString(text, { width: bodyWidth, lineGap: 1 }), 40)
    if (y + (heading ? 16 : 0) + first > bottom()) newPage()
    if (heading) y += put(heading, left, y, { width: bodyWidth, font: 'bold', size: 10, color }) + 2
    if (text) {
      pdf.font('body').fontSize(10).fillColor(INK)
      pdf.text(text, left, y, { width: bodyWidth, lineGap: 1 })
      y = pdf.y
    }
    y += 14
  }
  if (doc.status === 'paid') {
    paragraph(doc.paidAt ? `Paid on ${formatDay(doc.paidAt)}` : 'Paid', doc.paymentNote?.trim() ?? '', ACCENT)
  }
  else if (doc.status === 'cancelled') {
    paragraph(INVOICE_STATUS_LABELS.cancelled, 'This invoice was cancelled and is kept for the record only.', ALERT)
  }
  if (doc.notes.trim()) paragraph('Notes', doc.notes.trim())

  // ——— Footer on every page, inside the bottom margin ———
  const range = pdf.bufferedPageRange()
  const footerLeft = doc.number ? `${doc.company.name} · Invoice ${doc.number}` : `${doc.company.name} · Invoice being prepared`
  for (let i = range.start; i < range.start + range.count; i++) {
    pdf.switchToPage(i)
    const savedBottom = pdf.page.margins.bottom
    pdf.page.margins.bottom = 0 // writing below the body would otherwise start a new page
    const footerY = pdf.page.height - PAGE_MARGIN + 16
    put(footerLeft, left, footerY, { width: bodyWidth - 110, size: 8.5, color: MUTED })
    put(`Page ${i - range.start + 1} of ${range.count}`, right - 110, footerY, { width: 110, size: 8.5, color: MUTED, align: 'right' })
    pdf.page.margins.bottom = savedBottom
  }

  pdf.end()
  return done
}
