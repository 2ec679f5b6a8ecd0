// The large invented company's book (scripts/seed-scale.ts): its plans with windowed visit
// templates, the towns its customers live in, and how many technicians it employs. Short weekly
// checks (a skimmer, filter and water test round on small garden ponds) keep the season's work
// within the team's time. Invented data, no real place.
import type { VisitScheduleForm } from '../../shared/utils/visit-windows'

export interface ScaleTemplate { visitType: 'routine' | 'water_test' | 'spring_cleanout' | 'fall_shutdown', form: VisitScheduleForm, minutes: number }
export interface ScalePlan { name: string, share: number, billingCadence: 'yearly' | 'monthly' | 'per_visit', priceMinor: number, templates: ScaleTemplate[] }

export const SCALE_PLANS: ScalePlan[] = [
  { name: 'Weekly Care', share: 0.55, billingCadence: 'monthly', priceMinor: 18_900, templates: [
    { visitType: 'routine', form: { kind: 'every', interval: 1, unit: 'week', from: '03-25', to: '10-31', toleranceDays: 2 }, minutes: 6 },
    { visitType: 'spring_cleanout', form: { kind: 'once', from: '03-15', to: '04-30' }, minutes: 60 },
    { visitType: 'fall_shutdown', form: { kind: 'once', from: '10-15', to: '11-15' }, minutes: 40 },
    { visitType: 'water_test', form: { kind: 'every', interval: 1, unit: 'month', from: '12-01', to: '02-28', toleranceDays: 7 }, minutes: 8 },
  ] },
  { name: 'Full Care', share: 0.37, billingCadence: 'yearly', priceMinor: 145_000, templates: [
    { visitType: 'water_test', form: { kind: 'every', interval: 1, unit: 'week', from: '05-01', to: '09-30', toleranceDays: 2 }, minutes: 6 },
    { visitType: 'routine', form: { kind: 'every', interval: 2, unit: 'week', from: '04-01', to: '10-31', toleranceDays: 3 }, minutes: 15 },
    { visitType: 'spring_cleanout', form: { kind: 'once', from: '03-15', to: '04-30' }, minutes: 60 },
    { visitType: 'fall_shutdown', form: { kind: 'once', from: '10-15', to: '11-15' }, minutes: 40 },
  ] },
  { name: 'Spring & Fall Essentials', share: 0.08, billingCadence: 'per_visit', priceMinor: 32_500, templates: [
    { visitType: 'routine', form: { kind: 'every', interval: 4, unit: 'week', from: '03-01', to: '11-30', toleranceDays: 5 }, minutes: 30 },
    { visitType: 'spring_cleanout', form: { kind: 'once', from: '03-15', to: '04-30' }, minutes: 60 },
    { visitType: 'routine', form: { kind: 'once', from: '07-01', to: '07-31' }, minutes: 30 },
    { visitType: 'fall_shutdown', form: { kind: 'once', from: '10-15', to: '11-15' }, minutes: 40 },
  ] },
]

/**
 * Technicians the book needs: 40 (6.5–8 h a day, Monday to Friday). The season's visit time is
 * about 41 % of their time, but the spring clean-outs (mid-March to April) fill it: in runs of
 * the season bench 35 technicians left about 1,300 clean-outs without a day, 30 about 7,300, 40 none or a handful (the sites differ a little between seedings).
 */
export const SCALE_TECHNICIANS = 40

/** Centre of the invented region (around Larchfield) and its half-width in km. */
export const SCALE_REGION = { lat: 44.14, lon: -91.35, halfKm: 40 }

/** mulberry32: a small seeded PRNG, so the generated company is the same every run. */
export function seeded(seed: number) {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6D2B79F5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** A point generator: three quarters in eight towns of 2–5 km, the rest scattered over the region. */
export function scalePlaces(seed = 20270101) {
  const rnd = seeded(seed)
  const kmLat = 111.2
  const kmLon = 111.2 * Math.cos((SCALE_REGION.lat * Math.PI) / 180)
  const gauss = () => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd())
  const towns = Array.from({ length: 8 }, () => ({ lat: SCALE_REGION.lat + (rnd() * 1.5 - 0.75) * SCALE_REGION.halfKm / kmLat, lon: SCALE_REGION.lon + (rnd() * 1.5 - 0.75) * SCALE_REGION.halfKm / kmLon, km: 2 + rnd() * 3 }))
  return () => {
    if (rnd() < 0.75) {
      const t = towns[Math.floor(rnd() * towns.length)]!
      return { lat: t.lat + (gauss() * t.km) / kmLat, lon: t.lon + (gauss() * t.km) / kmLon }
    }
    return { lat: SCALE_REGION.lat + (rnd() * 2 - 1) * SCALE_REGION.halfKm / kmLat, lon: SCALE_REGION.lon + (rnd() * 2 - 1) * SCALE_REGION.halfKm / kmLon }
  }
}
