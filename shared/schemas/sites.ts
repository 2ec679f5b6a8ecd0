import { z } from 'zod'
import { createSchema, decimal, text, updateSchema } from './fields'

export const HAZARDS = ['dogs', 'deep_water', 'overhead_lines', 'steep_ground', 'other'] as const
export const HAZARD_LABELS: Record<(typeof HAZARDS)[number], string> = {
  dogs: 'Dogs',
  deep_water: 'Deep water',
  overhead_lines: 'Overhead lines',
  steep_ground: 'Steep or slippery ground',
  other: 'Other (see notes)',
}

const latitude = decimal('Latitude', -90, 90, { min: 'Latitude is between -90 and 90', max: 'Latitude is between -90 and 90' })
const longitude = decimal('Longitude', -180, 180, { min: 'Longitude is between -180 and 180', max: 'Longitude is between -180 and 180' })
const altitude = decimal('Altitude', -500, 6000, { min: 'Altitude is between -500 and 6000 m', max: 'Altitude is between -500 and 6000 m' })

/** A site's fields (all but its customer), without defaults: create and update are made from them. */
const siteFields = {
  name: text(120, 'Name the site, e.g. Home or Courtyard'),
  line1: text(200, 'Enter the street address'),
  line2: text(200),
  city: text(120, 'Enter the town or city'),
  region: text(120),
  postcode: text(20),
  country: text(10).toUpperCase().regex(/^[A-Z]{2}$/, 'Use a two-letter country code, e.g. US'),
  latitude: latitude.nullable(),
  longitude: longitude.nullable(),
  altitudeM: altitude.nullable(),
  accessNotes: text(2000),
  gateCode: text(80),
  hazards: z.array(z.enum(HAZARDS, 'Unknown hazard')).max(HAZARDS.length).transform(h => [...new Set(h)]),
  hazardNotes: text(2000),
}

export const siteSchema = createSchema({ customerId: z.uuid('Choose a customer'), ...siteFields }, {
  line2: '', region: '', postcode: '', country: 'US', latitude: null, longitude: null, altitudeM: null, accessNotes: '', gateCode: '', hazards: [], hazardNotes: '',
}).refine(s => (s.latitude == null) === (s.longitude == null), { path: ['longitude'], message: 'Give both latitude and longitude, or neither' })
export type SiteInput = z.output<typeof siteSchema>

/** PATCH: exactly the fields sent change; `archived` alone archives or restores. */
export const siteUpdateSchema = updateSchema(siteFields, { archived: z.boolean('Choose true or false') })
export type SiteUpdateInput = z.output<typeof siteUpdateSchema>
