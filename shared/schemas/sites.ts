import { z } from 'zod'

export const HAZARDS = ['dogs', 'deep_water', 'overhead_lines', 'steep_ground', 'other'] as const
export const HAZARD_LABELS: Record<(typeof HAZARDS)[number], string> = {
  dogs: 'Dogs',
  deep_water: 'Deep water',
  overhead_lines: 'Overhead lines',
  steep_ground: 'Steep or slippery ground',
  other: 'Other (see notes)',
}

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters`).default('')

export const siteSchema = z.object({
  customerId: z.uuid('Choose a customer'),
  name: z.string().trim().min(1, 'Name the site, e.g. Home or Courtyard').max(120),
  line1: z.string().trim().min(1, 'Enter the street address').max(200),
  line2: text(200),
  city: z.string().trim().min(1, 'Enter the town or city').max(120),
  region: text(120),
  postcode: text(20),
  country: z.string().trim().toUpperCase().regex(/^[A-Z]{2}$/, 'Use a two-letter country code, e.g. US').default('US'),
  latitude: z.number('Latitude is a number').min(-90, 'Latitude is between -90 and 90').max(90, 'Latitude is between -90 and 90').nullish(),
  longitude: z.number('Longitude is a number').min(-180, 'Longitude is between -180 and 180').max(180, 'Longitude is between -180 and 180').nullish(),
  altitudeM: z.number('Altitude is a number').min(-500, 'Altitude is between -500 and 6000 m').max(6000, 'Altitude is between -500 and 6000 m').nullish(),
  accessNotes: text(2000),
  gateCode: text(80),
  hazards: z.array(z.enum(HAZARDS, 'Unknown hazard')).max(HAZARDS.length).default([]).transform(h => [...new Set(h)]),
  hazardNotes: text(2000),
}).refine(s => (s.latitude == null) === (s.longitude == null), { path: ['longitude'], message: 'Give both latitude and longitude, or neither' })
export type SiteInput = z.output<typeof siteSchema>

export const siteUpdateSchema = z.object({
  name: z.string().trim().min(1, 'Name the site, e.g. Home or Courtyard').max(120),
  line1: z.string().trim().min(1, 'Enter the street address').max(200),
  line2: text(200),
  city: z.string().trim().min(1, 'Enter the town or city').max(120),
  region: text(120),
  postcode: text(20),
  country: z.string().trim().toUpperCase().regex(/^[A-Z]{2}$/, 'Use a two-letter country code, e.g. US'),
  latitude: z.number().min(-90).max(90).nullable(),
  longitude: z.number().min(-180).max(180).nullable(),
  altitudeM: z.number().min(-500).max(6000).nullable(),
  accessNotes: text(2000),
  gateCode: text(80),
  hazards: z.array(z.enum(HAZARDS, 'Unknown hazard')).max(HAZARDS.length).transform(h => [...new Set(h)]),
  hazardNotes: text(2000),
  archived: z.boolean(),
}).partial()
export type SiteUpdateInput = z.output<typeof siteUpdateSchema>
