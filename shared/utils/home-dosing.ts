// The customer's dosing helper between visits: an amount for their own pond's volume from the
// product's label rate (or, for salt and KH buffer, from the chemistry), with the cautions, and
// a "call us first" when the dose is past what a customer should do alone. The "call us"
// thresholds are common practice (no published source).
import type { LabelRate } from '../types/water'
import { bicarbonateForKH, doseFromLabelRate, MAX_KH_RISE_DKH_PER_DAY, saltToTarget } from './water/dosing'
import { mgLCaCO3ToDkh, POUND_G } from './water/units'

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
}
export interface HomeDose {
  amount: number
  unit: string
  /** Extra advice (e.g. "add this today, the rest over the next days"). */
  notes: string[]
  cautions: string[]
  /** Why to call instead of dosing, when the dose is past what a customer should do alone. */
  callUs: string | null
}

export function homeDose(i: HomeDoseInput): HomeDose {
  const cautions: string[] = [HOME_CAUTIONS.label, HOME_CAUTIONS.children]
  const notes: string[] = []
  switch (i.treatment) {
    case 'dechlorinator': {
      if (!i.label) throw new Error('A dechlorinator needs its label rate')
      const topUp = i.topUpL ?? 0
      const d = doseFromLabelRate(topUp, i.label, 'topUpL')
      cautions.push(HOME_CAUTIONS.dechlorinator)
      const callUs = topUp > CALL_US_TOP_UP_FRACTION * i.volumeL ? 'That is more than a fifth of the pond: it is a water change. Call us before you do it.' : null
      return { ...d, notes, cautions, callUs }
    }
    case 'bacteria': {
      if (!i.label) throw new Error('Bacteria need their label rate')
      return { ...doseFromLabelRate(i.volumeL, i.label), notes: ['Add it to the filter or the waterfall, with the pump running.'], cautions, callUs: null }
    }
    case 'salt': {
      const from = i.currentSaltPpt ?? 0
      const to = i.targetSaltPpt ?? 1
      cautions.push(HOME_CAUTIONS.salt)
      const callUs = to > CALL_US_SALT_PPT ? 'More than 0.3 % salt is a treatment: call us first.' : null
      notes.push('Add it in three parts, a day apart, dissolved in pond water.')
      return { amount: saltToTarget(i.volumeL, from, Math.min(to, CALL_US_SALT_PPT)), unit: 'kg', notes, cautions, callUs }
    }
    case 'kh_buffer': {
      const from = i.currentKhMgL ?? 0
      const to = i.targetKhMgL ?? 100
      cautions.push(HOME_CAUTIONS.kh)
      const fromDkh = mgLCaCO3ToDkh(from)
      const wantDkh = mgLCaCO3ToDkh(to)
      const todayTo = Math.min(wantDkh, fromDkh + MAX_KH_RISE_DKH_PER_DAY)
      const grams = bicarbonateForKH(i.volumeL, fromDkh, todayTo)
      if (wantDkh > todayTo) notes.push('This is today\'s amount (1 dKH); test again tomorrow and repeat until KH reaches the target.')
      const callUs = from < CALL_US_KH_MGL ? 'KH this low can let pH crash: call us today.' : null
      return { amount: grams, unit: 'g', notes, cautions, callUs }
    }
  }
}

const ML_PER_US_FL_OZ = 29.5735295625
/** An amount in the unit the customer reads: metric as it is; US adds ounces, pounds or fluid ounces. */
export function amountInUnits(amount: number, unit: string, system: 'us' | 'metric'): string {
  const n = (v: number, d = 1) => new Intl.NumberFormat('en-US', { maximumFractionDigits: d }).format(v)
  const metric = `${n(amount, amount < 10 ? 1 : 0)} ${unit}`
  if (system === 'metric') return metric
  if (unit === 'g') return `${n(amount / (POUND_G / 16))} oz (${metric})`
  if (unit === 'kg') return `${n((amount * 1000) / POUND_G)} lb (${metric})`
  if (unit === 'mL') return `${n(amount / ML_PER_US_FL_OZ)} fl oz (${metric})`
  if (unit === 'L') return `${n(amount / 3.785411784)} US gal (${metric})`
  return metric
}
