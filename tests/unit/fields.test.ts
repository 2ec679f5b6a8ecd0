import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { invoiceCreateSchema } from '../../shared/schemas/billing'
import { closedDaysSchema } from '../../shared/schemas/company'
import { customerSchema, customerUpdateSchema } from '../../shared/schemas/customers'
import { featureSchema, featureUpdateSchema } from '../../shared/schemas/features'
import { createSchema, isRealDate, localDate, MONEY_MAX_MINOR, NOTHING_TO_CHANGE, text, timestamp, updateSchema } from '../../shared/schemas/fields'
import { staffProfileSchema } from '../../shared/schemas/visits'
import { fieldErrors } from '../../shared/utils/field-errors'

// The one input gate (shared/schemas/fields.ts): text PostgreSQL can store, real dates in a sane
// range, money the columns hold, and update schemas that never invent a value.

const errorsOf = (schema: z.ZodType, value: unknown) => {
  const r = schema.safeParse(value)
  return r.success ? {} : fieldErrors(r.error)
}

describe('text', () => {
  const t = z.object({ note: text(10) })
  it('trims and bounds', () => {
    expect(t.parse({ note: '  hi  ' })).toEqual({ note: 'hi' })
    expect(errorsOf(t, { note: 'x'.repeat(11) }).note).toBe('Use at most 10 characters')
  })
  it('refuses NUL and lone surrogates, naming the field', () => {
    expect(errorsOf(t, { note: 'a\u0000b' }).note).toMatch(/NUL/)
    expect(errorsOf(t, { note: 'a\uD800' }).note).toMatch(/broken character/)
    expect(errorsOf(t, { note: '\uDC00' }).note).toMatch(/broken character/)
    expect(t.parse({ note: 'koi 🐟' }).note).toBe('koi 🐟')
  })
  it('a required text says what to enter', () => {
    expect(errorsOf(z.object({ name: text(10, 'Enter a name') }), { name: '   ' }).name).toBe('Enter a name')
  })
})

describe('dates and times', () => {
  it('knows real calendar dates', () => {
    expect(isRealDate('2028-02-29')).toBe(true)
    expect(isRealDate('2026-02-29')).toBe(false)
    expect(isRealDate('2026-02-30')).toBe(false)
    expect(isRealDate('2000-02-29')).toBe(true)
    expect(isRealDate('2100-02-29')).toBe(false)
    expect(isRealDate('2026-13-01')).toBe(false)
    expect(isRealDate('2026-04-31')).toBe(false)
  })
  it('a local date is real and between 1900 and 2200', () => {
    expect(localDate.safeParse('2026-04-01').success).toBe(true)
    for (const bad of ['0000-01-01', '1899-12-31', '2201-01-01', '2026-02-30', '2026-00-10', '26-04-01', '2026-04-01T00:00', '', '9999-99-99']) {
      expect(localDate.safeParse(bad).success, bad).toBe(false)
    }
    expect(errorsOf(closedDaysSchema, { days: [{ day: '2026-02-30' }] })['days.0.day']).toMatch(/no such date/)
    expect(errorsOf(closedDaysSchema, { days: [{ day: '0000-01-01' }] })['days.0.day']).toMatch(/between 1900 and 2200/)
  })
  it('a timestamp has an offset and a real date in range', () => {
    expect(timestamp.safeParse('2026-04-01T09:30:00Z').success).toBe(true)
    expect(timestamp.safeParse('2026-04-01T09:30:00+02:00').success).toBe(true)
    for (const bad of ['0000-01-01T00:00:00Z', '2026-02-30T10:00:00Z', '2026-04-01', '2026-04-01T09:30:00']) {
      expect(timestamp.safeParse(bad).success, bad).toBe(false)
    }
  })
})

describe('money', () => {
  const line = { kind: 'labour', description: 'Work', quantity: 1, unitPriceMinor: 100_000_000 }
  it('a line whose amount the column cannot hold is refused', () => {
    expect(errorsOf(invoiceCreateSchema, { customerId: crypto.randomUUID(), lines: [{ ...line, quantity: 22 }] })['lines.0.unitPriceMinor']).toMatch(/more than an invoice can hold/)
  })
  it('many big lines whose sum the total column cannot hold are refused', () => {
    const lines = Array.from({ length: 22 }, () => line)
    expect(errorsOf(invoiceCreateSchema, { customerId: crypto.randomUUID(), lines }).lines).toMatch(/add up to more than an invoice can hold/)
    expect(MONEY_MAX_MINOR).toBe(2 ** 31 - 1)
  })
})

describe('create and update schemas from one list of fields', () => {
  const fields = { name: text(20, 'Name it'), tags: z.array(text(10)), notes: text(100) }
  const create = createSchema(fields, { tags: [], notes: '' })
  const update = updateSchema(fields, { archived: z.boolean() })
  it('create fills defaults (fresh copies each time)', () => {
    const a = create.parse({ name: 'a' })
    expect(a).toEqual({ name: 'a', tags: [], notes: '' })
    a.tags.push('x')
    expect(create.parse({ name: 'b' }).tags).toEqual([])
    expect(create.safeParse({}).success).toBe(false)
  })
  it('update keeps only the keys sent and refuses an empty body', () => {
    expect(update.parse({ notes: 'n' })).toEqual({ notes: 'n' })
    expect(update.parse({ archived: false })).toEqual({ archived: false })
    expect(errorsOf(update, {})._).toBe(NOTHING_TO_CHANGE)
    expect(errorsOf(update, { unknown: 1 })._).toBe(NOTHING_TO_CHANGE)
  })
  it('every resource update keeps only the keys sent', () => {
    expect(customerUpdateSchema.parse({ name: 'x' })).toEqual({ name: 'x' })
    expect(customerUpdateSchema.parse({ archived: false })).toEqual({ archived: false })
    expect(featureUpdateSchema.parse({ equipment: { aerator: true } })).toEqual({ equipment: { aerator: true } })
    expect(staffProfileSchema.safeParse({}).success).toBe(false)
    expect(customerSchema.parse({ name: 'x', kind: 'household' }).contacts).toEqual([])
    expect(featureSchema.shape.equipment.parse(undefined).pumps).toEqual([])
  })
})
