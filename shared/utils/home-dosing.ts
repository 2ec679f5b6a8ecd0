// The customer's dosing helper between visits: an amount for their own pond's volume from the
// product's label rate (or, for salt and KH buffer, from the chemistry), with the cautions, and
// a "call us first" when the dose is past what a customer should do alone. The "call us"
// thresholds are common practice (no published source).
import type { LabelRate } from '../types/water'
import { bicarbonateForKH, doseFromLabelRate, MAX_KH_RISE_DKH_PER_DAY, saltToTarget } from './water/dosing'
import { formatDose, type UnitSystem } from './water/format'
import { formatParameter } from './water/parameters'
import { ammoniaHoldsBackKh, callUsToday } from './water/rules'
import { SAFETY_CAUTIONS, safetySentence } from './safety'
import { mgLCaCO3ToDkh } from './water/units'

export type HomeTreatment = 'dechlorinator' | 'bacteria' | 'salt' | 'kh_buffer'

/** A top-up bigger than this share of the pond is a water change: call first (chloramine releases ammonia). */
export const CALL_US_TOP_UP_FRACTION = 0.2
/** Salt above 3 g/L (0.3 %) is a treatment, not a standing level. */
export const CALL_US_SALT_PPT = 3
/** KH below about 1 dKH (≈ 18 mg/L as CaCO3): pH can crash; call first. */
export const CALL_US_KH_MGL = 18

export const HOME_CAUTIONS = {
  label: 'Read the product label first and follow it; these amounts are worked out from its label rate and your pond\'s volume.',
  children: 'Keep treatments out of reach of children and pets.',
  gloves: safetySentence(SAFETY_CAUTIONS.gloves),
  neverMix: safetySentence(SAFETY_CAUTIONS.neverMix),
  salt: 'Salt harms many pond plants and some fish (some catfish, sturgeon and others): do not salt a pond with them. Salt does not evaporate; only water changes lower it.',
  kh: 'Raise KH by no more than about 1 dKH a day; dissolve it in a bucket of pond water first.',
  dechlorinator: 'Treat the whole top-up volume, every time you add tap water.',
} as const

export interface HomeDoseInput {
  treatment: HomeTreatment
  volumeL: number
  label?: LabelRate | null
  topUpL?: number
  currentSaltPpt?: number
  targetSaltPpt?: number
  currentKhMgL?: number
  targetKhMgL?: number
  /** The company's unit system for `amountText` and every sentence (default 'metric'). */
  unitSystem?: UnitSystem
  /** The latest test's un-ionized ammonia (mg/L as NH3) and its watch level: a KH buffer waits while it is at or above it. */
  latest?: { nh3MgL?: number | null, nh3WatchMgL?: number | null }
  /** The company's phone number, said with "call us today". */
  phone?: string | null
}
export interface HomeDose {
  /** In SI (`unit`): g, kg, or the label's unit; 0 when nothing should be added. */
  amount: number
  unit: string
  /** The amount in the company's units, rounded to what can be measured out ('' when nothing should be added). */
  amountText: string
  /** Extra advice (e.g. "add this today, the rest over the next days"). */
  notes: string[]
  cautions: string[]
  /** Why to call instead of dosing, when the dose is past what a customer should do alone. */
  callUs: string | null
}

export function homeDose(i: HomeDoseInput): HomeDose {
  const system = i.unitSystem ?? 'metric'
  const cautions: string[] = [HOME_CAUTIONS.label, HOME_CAUTIONS.children, HOME_CAUTIONS.gloves, HOME_CAUTIONS.neverMix]
  const notes: string[] = []
  const dose = (amount: number, unit: string, callUs: string | null): HomeDose =>
    ({ amount, unit, amountText: formatDose(amount, unit, system), notes, cautions, callUs })
  switch (i.treatment) {
    case 'dechlorinator': {
      if (!i.label) throw new Error('A dechlorinator needs its label rate')
      const topUp = i.topUpL ?? 0
      const d = doseFromLabelRate(topUp, i.label, 'topUpL')
      cautions.push(HOME_CAUTIONS.dechlorinator)
      const callUs = topUp > CALL_US_TOP_UP_FRACTION * i.volumeL ? 'That is more than a fifth of the pond: it is a water change. Call us before you do it.' : null
      return dose(d.amount, d.unit, callUs)
    }
    case 'bacteria': {
      if (!i.label) throw new Error('Bacteria need their label rate')
      const d = doseFromLabelRate(i.volumeL, i.label)
      notes.push('Add it to the filter or the waterfall, with the pump running.')
      return dose(d.amount, d.unit, null)
    }
    case 'salt': {
      const from = i.currentSaltPpt ?? 0
      const to = i.targetSaltPpt ?? 1
      cautions.push(HOME_CAUTIONS.salt)
      const callUs = to > CALL_US_SALT_PPT ? `More than ${formatParameter('saltGL', CALL_US_SALT_PPT, system)} salt is a treatment: call us first.` : null
      notes.push('Add it in three parts, a day apart, dissolved in pond water.')
      return dose(saltToTarget(i.volumeL, from, Math.min(to, CALL_US_SALT_PPT)), 'kg', callUs)
    }
    case 'kh_buffer': {
      const from = i.currentKhMgL ?? 0
      const to = i.targetKhMgL ?? 100
      // No KH buffer while un-ionized ammonia is at or above its watch level (Emerson et al. 1975).
      if (ammoniaHoldsBackKh(i.latest?.nh3MgL, i.latest?.nh3WatchMgL)) {
        notes.push('Bring ammonia down first: feed lightly, keep the water moving, and let us change some water.')
        return {
          amount: 0, unit: 'g', amountText: '', notes, cautions,
          callUs: 'Do not add a KH buffer yet: your last test shows ammonia at a harmful level, and a KH buffer raises pH, which makes ammonia more harmful. KH can be raised once ammonia is down. Call us about the ammonia first.',
        }
      }
      cautions.push(HOME_CAUTIONS.kh)
      const fromDkh = mgLCaCO3ToDkh(from)
      const wantDkh = mgLCaCO3ToDkh(to)
      const todayTo = Math.min(wantDkh, fromDkh + MAX_KH_RISE_DKH_PER_DAY)
      const grams = bicarbonateForKH(i.volumeL, fromDkh, todayTo)
      if (wantDkh > todayTo) notes.push('This is today\'s amount (1 dKH); test again tomorrow and repeat until KH reaches the target.')
      const callUs = from < CALL_US_KH_MGL ? `KH this low can let pH crash. ${callUsToday(i.phone)}` : null
      return dose(grams, 'g', callUs)
    }
  }
}
