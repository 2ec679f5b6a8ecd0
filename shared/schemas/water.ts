import { z } from 'zod'
import { rangeTableSchema } from './features'
import { text } from './fields'

const conc = (what: string, max: number) => z.number(`${what} is a number`).min(0, `${what} cannot be negative`).max(max, `${what} above ${max} is not plausible`).nullish()

/** One water test in SI units (mg/L; KH and GH as CaCO3; salt g/L; temperature °C). */
export const waterReadingSchema = z.object({
  temperatureC: z.number('Temperature is a number').min(0, 'Water below 0 °C is ice').max(45, 'Water above 45 °C is not plausible for a pond').nullish(),
  pH: z.number('pH is a number').min(0, 'pH is between 0 and 14').max(14, 'pH is between 0 and 14').nullish(),
  totalAmmoniaMgL: conc('Total ammonia', 100),
  ammoniaBasis: z.enum(['N', 'NH3'], 'Choose whether the kit reports ammonia as N or as NH3').default('N'),
  nitriteMgL: conc('Nitrite', 100),
  nitrateMgL: conc('Nitrate', 1000),
  khMgL: conc('KH', 1000),
  ghMgL: conc('GH', 2000),
  dissolvedOxygenMgL: conc('Dissolved oxygen', 30),
  saltGL: conc('Salt', 40),
  chlorineMgL: conc('Chlorine', 20),
  phosphateMgL: conc('Phosphate', 50),
  waterLevelMm: z.number('Water level is a number').min(-5000).max(5000).nullish(),
})
export type WaterReadingInput = z.output<typeof waterReadingSchema>

const labelRateSchema = z.object({
  amount: z.number().positive('Label amount must be more than 0').max(100_000),
  unit: text(20, 'Give the unit'),
  perLitres: z.number().positive('Label volume must be more than 0').max(10_000_000),
})

/** POST /api/water/evaluate: a reading plus either a feature id or a volume (and optional ranges). */
export const evaluateRequestSchema = z.object({
  reading: waterReadingSchema,
  featureId: z.uuid('Not a valid feature id').optional(),
  volumeL: z.number('Volume is a number').positive('Volume must be more than 0').max(5_000_000, 'Volume above 5,000,000 L is not plausible').optional(),
  kind: z.enum(['koi_pond', 'water_garden', 'pondless_waterfall', 'stream', 'fountain', 'wetland_filter']).optional(),
  ranges: rangeTableSchema.optional(),
  topUpLitres: z.number('Top-up is a number').min(0, 'Top-up cannot be negative').max(1_000_000).optional(),
  dechlorinatorRate: labelRateSchema.nullish(),
  altitudeM: z.number().min(-500, 'Altitude is between -500 and 6000 m').max(6000, 'Altitude is between -500 and 6000 m').optional(),
}).refine(r => r.featureId || r.volumeL, { path: ['volumeL'], message: 'Give a featureId or a volumeL' })
export type EvaluateRequest = z.output<typeof evaluateRequestSchema>
