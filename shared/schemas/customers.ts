import { z } from 'zod'

export const CUSTOMER_KINDS = ['household', 'business', 'association', 'public'] as const
export const CUSTOMER_KIND_LABELS: Record<(typeof CUSTOMER_KINDS)[number], string> = {
  household: 'Household',
  business: 'Business',
  association: 'Homeowners\' association',
  public: 'Public or community',
}

const optionalText = (max: number) => z.string().trim().max(max, `Use at most ${max} characters`).default('')

export const contactSchema = z.object({
  id: z.uuid().optional(),
  name: z.string().trim().min(1, 'Enter the contact\'s name').max(120),
  email: z.union([z.literal(''), z.email('Enter a valid e-mail address')]).transform(v => v || null).nullish(),
  phone: z.string().trim().max(40, 'Use at most 40 characters').regex(/^[\d\s()+.\-x]*$/, 'Use digits, spaces and + ( ) - only').transform(v => v || null).nullish(),
  getsReports: z.boolean().default(true),
  getsInvoices: z.boolean().default(true),
  getsAlerts: z.boolean().default(true),
}).refine(c => !(c.getsReports || c.getsInvoices || c.getsAlerts) || !!c.email, {
  path: ['email'],
  message: 'A contact who gets reports, invoices or alerts needs an e-mail address',
})
export type ContactInput = z.output<typeof contactSchema>

export const customerSchema = z.object({
  name: z.string().trim().min(1, 'Enter the customer\'s name').max(160),
  kind: z.enum(CUSTOMER_KINDS, 'Choose household, business, association or public'),
  contacts: z.array(contactSchema).max(20, 'At most 20 contacts').default([]),
  billingLine1: optionalText(200),
  billingLine2: optionalText(200),
  billingCity: optionalText(120),
  billingRegion: optionalText(120),
  billingPostcode: optionalText(20),
  billingCountry: z.string().trim().toUpperCase().regex(/^[A-Z]{2}$/, 'Use a two-letter country code, e.g. US').default('US'),
  tags: z.array(z.string().trim().toLowerCase().min(1).max(40, 'Tags are at most 40 characters')).max(20, 'At most 20 tags').default([])
    .transform(tags => [...new Set(tags)]),
  notes: optionalText(4000),
  active: z.boolean().default(true),
})
export type CustomerInput = z.output<typeof customerSchema>

export const customerUpdateSchema = customerSchema.partial().extend({
  archived: z.boolean().optional(),
})
export type CustomerUpdateInput = z.output<typeof customerUpdateSchema>

export const CUSTOMER_SORTS = ['name', 'kind', 'createdAt', 'features'] as const
