import { describe, expect, it } from 'vitest'
import { renderInvoicePdf } from '../../server/utils/invoice-pdf'
import type { InvoiceDocument } from '../../shared/types/billing'
import { readPages, type Fragment } from '../helpers/pdf-text'

// The reader of the PDFs pdfkit writes is shared with the API tests.

/** A literal string of the info dictionary; pdfkit writes each value as its own (never compressed) object. */
function infoEntry(pdf: Buffer, key: string): string | undefined {
  const s = pdf.toString('latin1')
  const object = (id: string | undefined) => id ? new RegExp(`(?:^|\\n)${id} 0 obj\\n([\\s\\S]*?)\\nendobj`).exec(s)?.[1] : undefined
  const info = object(/\/Info (\d+) 0 R/.exec(s.slice(s.lastIndexOf('trailer')))?.[1])
  const value = object(new RegExp(`/${key} (\\d+) 0 R`).exec(info ?? '')?.[1])
  return value?.match(/^\((.*)\)$/s)?.[1]?.replace(/\\([\\()])/g, '$1')
}

const pageText = (page: Fragment[]) => page.map(f => f.text).join('\n')
const pageCount = (pdf: Buffer) => pdf.toString('latin1').match(/\/Type \/Page\b/g)?.length ?? 0

// ——— Invented sample data ———

function sample(over: Partial<InvoiceDocument> = {}): InvoiceDocument {
  return {
    number: '2026-0007',
    status: 'due',
    currency: 'USD',
    issueDate: '2026-12-02',
    dueDate: '2027-01-01',
    periodStart: '2027-01-01',
    periodEnd: '2027-12-31',
    company: { name: 'Heronmere Water Gardens', addressLines: ['14 Reedbank Lane', 'Millbrook, OR 97000'], email: 'office@heronmere.example' },
    customer: { name: 'Whitcombe household', addressLines: ['3 Alder Close', 'Millbrook, OR 97001'] },
    lines: [
      { description: 'Seasonal Care — 2027 term', quantity: 1, unitPriceMinor: 145000, amountMinor: 145000, taxable: true },
      { description: 'Pump impeller (part)', quantity: 2, unitPriceMinor: 3850, amountMinor: 7700, taxable: true },
      { description: 'Dechlorinator treatment', quantity: 1.5, unitPriceMinor: 1800, amountMinor: 2700, taxable: false },
    ],
    subtotalMinor: 155400,
    taxRateBasisPoints: 725,
    taxMinor: 11071,
    totalMinor: 166471,
    amountPaidMinor: 0,
    amountDueMinor: 166471,
    paidAt: null,
    paymentNote: null,
    notes: 'Thank you for keeping the pond with us for another year.',
    ...over,
  }
}

function manyLines(n: number): InvoiceDocument['lines'] {
  return Array.from({ length: n }, (_, i) => ({
    description: i % 7 === 0
      ? `Visit ${i + 1}: filter rinse, skimmer basket, marginal shelf trim and a water test with the readings left on the card by the pump housing`
      : `Visit ${i + 1}: routine care`,
    quantity: 1,
    unitPriceMinor: 6500,
    amountMinor: 6500,
    taxable: i % 3 !== 0,
  }))
}

describe('invoice PDF', () => {
  it('renders a well-formed, compressed PDF with the invoice metadata', async () => {
    const pdf = await renderInvoicePdf(sample())
    const text = pdf.toString('latin1')
    expect(text.startsWith('%PDF-')).toBe(true)
    expect(text).toMatch(/%%EOF\s*$/)
    expect(pdf.length).toBeGreaterThan(5_000)
    expect(pdf.length).toBeLessThan(150_000)
    expect(infoEntry(pdf, 'Title')).toBe('Invoice 2026-0007')
    expect(infoEntry(pdf, 'Author')).toBe('Heronmere Water Gardens')
    expect(text).toContain('/Filter /FlateDecode')
    expect(pageCount(pdf)).toBe(1)
  })

  it('lays out the header, bill-to, lines and totals in Work Sans', async () => {
    const pdf = await renderInvoicePdf(sample(), { compress: false })
    const raw = pdf.toString('latin1')
    expect(raw).not.toContain('/Filter /FlateDecode')
    expect(raw).toMatch(/\/BaseFont \/[A-Z]{6}\+WorkSans-Regular/)
    expect(raw).toMatch(/\/BaseFont \/[A-Z]{6}\+WorkSans-SemiBold/)
    expect(raw).not.toContain('Helvetica')

    const [page] = readPages(pdf)
    const text = pageText(page!)
    for (const s of [
      'Heronmere Water Gardens', '14 Reedbank Lane', 'office@heronmere.example', 'Invoice', '2026-0007', 'Due',
      'Dec 2, 2026', 'Jan 1, 2027', 'Jan 1, 2027 – Dec 31, 2027', 'Bill to', 'Whitcombe household', '3 Alder Close',
      'Description', 'Qty', 'Unit price', 'Amount', 'Seasonal Care — 2027 term', 'Pump impeller (part)',
      'Dechlorinator treatment', '1.5', '$38.50', '$77.00', 'Subtotal', '$1,554.00', 'Tax (7.25 %)', '$110.71',
      'Total', 'Amount due', '$1,664.71', 'Notes', 'Page 1 of 1',
    ]) expect(text).toContain(s)
    // Exactly one "no tax" note, under the non-taxable line; nothing paid, so no Paid row.
    expect(page!.filter(f => f.text === 'no tax')).toHaveLength(1)
    expect(text).not.toMatch(/^Paid/m)
    // Numbers are right-aligned to the right margin (612 − 50).
    const amount = page!.find(f => f.text === '$1,664.71' && f.size === 12)!
    expect(amount.font).toMatch(/SemiBold/)
    expect(amount.x).toBeGreaterThan(480)
    // Everything but the footer sits inside the 50 pt margins.
    for (const f of page!.filter(f => !/^Page \d/.test(f.text) && !f.text.startsWith('Heronmere Water Gardens ·'))) {
      expect(f.x).toBeGreaterThanOrEqual(50)
      expect(f.y).toBeGreaterThan(50)
      expect(f.y).toBeLessThan(742)
    }
  })

  it('breaks long invoices across pages, repeating the table header and numbering every page', async () => {
    const lines = manyLines(80)
    const total = lines.reduce((s, l) => s + l.amountMinor, 0)
    const pdf = await renderInvoicePdf(sample({ lines, subtotalMinor: total, taxMinor: 0, totalMinor: total, amountDueMinor: total }), { compress: false })
    const pages = readPages(pdf)
    const n = pages.length
    expect(n).toBeGreaterThanOrEqual(2)
    expect(pageCount(pdf)).toBe(n)
    pages.forEach((page, i) => {
      expect(page.map(f => f.text)).toContain(`Page ${i + 1} of ${n}`)
      if (page.some(f => /^Visit \d+:/.test(f.text))) expect(page.filter(f => f.text === 'Description')).toHaveLength(1)
      // No line of the table runs into the footer.
      for (const f of page.filter(f => /^Visit \d+:/.test(f.text))) expect(f.y).toBeLessThan(742)
    })
    // Every line made it, once, in order; the long descriptions wrapped onto more than one line.
    const firsts = pages.flat().map(f => /^Visit (\d+):/.exec(f.text)?.[1]).filter(Boolean).map(Number)
    expect(firsts).toEqual(Array.from({ length: 80 }, (_, i) => i + 1))
    const all = pages.map(pageText).join('\n')
    expect(all).toContain('pump housing')
    expect(all).not.toContain('pump housing\nVisit 2') // the wrapped tail stays with its own line
    expect(pages.at(-1)!.map(f => f.text)).toContain('Amount due')
    expect(all.match(/no tax/g)).toHaveLength(27) // i % 3 === 0 for i in 0..79
  })

  it('shows paid invoices with the payment date, note and the Paid row', async () => {
    const pdf = await renderInvoicePdf(sample({ status: 'paid', amountPaidMinor: 166471, amountDueMinor: 0, paidAt: '2026-12-10', paymentNote: 'Cheque 1042' }), { compress: false })
    const text = pageText(readPages(pdf)[0]!)
    expect(text).toContain('Paid\n')
    expect(text).toContain('-$1,664.71')
    expect(text).toContain('$0.00')
    expect(text).toContain('Paid on Dec 10, 2026')
    expect(text).toContain('Cheque 1042')
  })

  it('marks cancelled invoices clearly, and invoices being prepared have no number', async () => {
    const voided = pageText(readPages(await renderInvoicePdf(sample({ status: 'cancelled' }), { compress: false }))[0]!)
    expect(voided).toContain('Cancelled')
    expect(voided).toMatch(/^CANCELLED — /m)

    const draftPdf = await renderInvoicePdf(sample({ number: null, status: 'preparing', issueDate: null, dueDate: null, periodStart: null, periodEnd: null, taxRateBasisPoints: 800 }), { compress: false })
    expect(infoEntry(draftPdf, 'Title')).toBe('Invoice being prepared')
    const draft = pageText(readPages(draftPdf)[0]!)
    expect(draft).toContain('Invoice\nBeing prepared')
    expect(draft).toContain('Tax (8 %)')
    expect(draft).not.toContain('Issue date')
    expect(draft).not.toContain('Service period')
  })

  it('falls back to the built-in Helvetica pair, and never throws over a bad font', async () => {
    const pdf = await renderInvoicePdf(sample(), { compress: false, fonts: null })
    const raw = pdf.toString('latin1')
    expect(raw).toContain('/BaseFont /Helvetica\n')
    expect(raw).toContain('/BaseFont /Helvetica-Bold')
    expect(raw).not.toContain('WorkSans')
    expect(raw).not.toContain('/FontFile2')
    const text = pageText(readPages(pdf)[0]!)
    expect(text).toContain('Seasonal Care — 2027 term')
    expect(text).toContain('$1,664.71')

    const junk = { regular: new Uint8Array(64).fill(7), semibold: new Uint8Array(64).fill(9) }
    const fallback = await renderInvoicePdf(sample(), { compress: false, fonts: junk })
    expect(fallback.toString('latin1')).toContain('/BaseFont /Helvetica')
  })

  it('renders a 10-line invoice in well under 300 ms', async () => {
    const lines = manyLines(10)
    const doc = sample({ lines })
    await renderInvoicePdf(doc) // fonts loaded and prepared once per process
    const times: number[] = []
    for (let i = 0; i < 3; i++) {
      const t = performance.now()
      await renderInvoicePdf(doc)
      times.push(performance.now() - t)
    }
    expect(times.sort((a, b) => a - b)[1]).toBeLessThan(300)
  })
})
