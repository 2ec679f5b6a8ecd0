import { z } from 'zod'
import { createSchema, text, updateSchema } from './fields'

export const CUSTOMER_KINDS = ['household', 'business', 'association', 'public'] as const
export const CUSTOMER_KIND_LABELS: Record<(typeof CUSTOMER_KINDS)[number], string> = {
  household: 'Household',
  business: 'Business',
  association: 'Homeowners\' association',
  public: 'Public or community',
}

const email = z.union([z.literal(''), z.email('Enter a valid e-mail address').max(254, 'Use at most 254 characters')])

export const contactSchema = z.object({
  id: z.uuid().optional(),
  name: text(120, 'Enter the contact\'s name'),
  email: email.transform(v => v || null).nullish(),
  phone: text(40).regex(/^[\d\s()+.\-x]*$/, 'Use digits, spaces and + ( ) - only').transform(v => v || null).nullish(),
  getsReports: z.boolean().default(true),
  getsInvoices: z.boolean().default(true),
  getsAlerts: z.boolean().default(true),
}).refine(c => !(c.getsReports || c.getsInvoices || c.getsAlerts) || !!c.email, {
  path: ['email'],
  message: 'A contact who gets reports, invoices or alerts needs an e-mail address',
})
export type ContactInput = z.output<typeof contactSchema>

/** A customer's fields, without defaults: the create and update schemas are both made from them. */
const customerFields = {
  name: text(160, 'Enter the customer\'s name'),
  kind: z.enum(CUSTOMER_KINDS, 'Choose household, business, association or public'),
  /** The whole list: sending it replaces the contacts (each keeps its id when sent with it). */
  contacts: z.array(contactSchema).max(20, 'At most 20 contacts'),
  billingLine1: text(200),
  billingLine2: text(200),
  billingCity: text(120),
  billingRegion: text(120),
  billingPostcode: text(20),
  billingCountry: text(10).toUpperCase().regex(/^[A-Z]{2}$/, 'Use a two-letter country code, e.g. US'),
  tags: z.array(text(40, 'A tag cannot be empty').toLowerCase()).max(20, 'At most 20 tags')
    .transform(tags => [...new Set(tags)]),
  notes: text(4000),
  active: z.boolean('Choose yes or no'),
}

export const customerSchema = createSchema(customerFields, {
  contacts: [], billingLine1: '', billingLine2: '', billingCity: '', billingRegion: '', billingPostcode: '', billingCountry: 'US', tags: [], notes: '', active: true,
})
export type CustomerInput = z.output<typeof customerSchema>

/** PATCH: exactly the fields sent change; `archived` alone archives or restores. */
export const customerUpdateSchema = updateSchema(customerFields, { archived: z.boolean('Choose true or false') })
export type CustomerUpdateInput = z.output<typeof customerUpdateSchema>

export const CUSTOMER_SORTS = ['name', 'kind', 'createdAt', 'features'] as const
