import { z } from 'zod'
import { MAX_REQUEST_PHOTOS, REQUEST_KINDS } from '../types/requests'
import { pageQuery } from './common'
import { localDate, text, timestamp, updateSchema, wholeNumber } from './fields'
import type { UnitSystem } from '../utils/water/format'
import { perUnitSystem, waterReadingSchemaFor } from './water'

/** A customer's own test (test strips or a drop kit) between visits; saved as customer-entered. Messages in `system`'s units. */
export const customerReadingSchemaFor = perUnitSystem((system: UnitSystem) => waterReadingSchemaFor(system).pick({
  temperatureC: true, pH: true, totalAmmoniaMgL: true, ammoniaBasis: true, nitriteMgL: true, nitrateMgL: true, khMgL: true, ghMgL: true, chlorineMgL: true,
}).extend({
  /** Made by the browser, so sending twice saves one reading. */
  id: z.uuid('Not a valid reading id'),
  featureId: z.uuid('Choose the water feature'),
  takenAt: timestamp,
}).refine(r => ['temperatureC', 'pH', 'totalAmmoniaMgL', 'nitriteMgL', 'nitrateMgL', 'khMgL', 'ghMgL', 'chlorineMgL'].some(k => r[k as keyof typeof r] != null), {
  path: ['pH'], message: 'Enter at least one result',
}))
export const customerReadingSchema = customerReadingSchemaFor('metric')
export type CustomerReadingInput = z.output<typeof customerReadingSchema>

export const serviceRequestSchema = z.object({
  siteId: z.uuid('Choose where'),
  featureId: z.uuid('Not a valid water feature').nullish(),
  kind: z.enum(REQUEST_KINDS, 'Choose what it is about'),
  preferredDates: z.array(localDate).max(3, 'Give at most three dates').default([]),
  description: text(2000, 'Tell us a little more (at least 10 characters)').min(10, 'Tell us a little more (at least 10 characters)'),
})
export type ServiceRequestInput = z.output<typeof serviceRequestSchema>

export const requestPhotoFields = z.object({
  id: z.uuid('Not a valid photo id'),
  caption: text(200).default(''),
})
export { MAX_REQUEST_PHOTOS }

export const requestScheduleSchema = z.object({
  date: localDate,
  startTime: z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a time like 09:30'),
  durationMinutes: wholeNumber('Duration', 15, 600, { min: 'At least 15 minutes', max: 'At most 10 hours' }),
  technicianId: z.uuid('Choose a technician').nullish(),
  visitType: z.enum(['routine', 'repair', 'water_test', 'spring_cleanout', 'net_cleanout', 'net_install', 'fall_shutdown'], 'Choose the kind of visit'),
  reply: text(1000).default(''),
})
export type RequestScheduleInput = z.output<typeof requestScheduleSchema>

export const requestDeclineSchema = z.object({
  reply: text(1000, 'Tell the customer why'),
})

export const requestListQuery = pageQuery.omit({ q: true }).extend({
  status: z.enum(['new', 'scheduled', 'declined', 'done', 'open'], 'Use new, scheduled, declined, done or open').optional(),
})

/** PATCH of the portal preferences: exactly the fields (and the contacts) sent change. */
export const preferencesSchema = updateSchema({
  unitSystem: z.enum(['us', 'metric'], 'Choose US or metric units').nullable(),
  contacts: z.array(z.object({
    id: z.uuid('Not a valid contact'),
    getsReports: z.boolean(),
    getsInvoices: z.boolean(),
    getsAlerts: z.boolean(),
  })).max(50),
})
export type PreferencesInput = z.output<typeof preferencesSchema>
