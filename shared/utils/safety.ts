// The one list of safety cautions (PRODUCT.md, Safety): pond work involves mains power near
// water, chemicals, deep water and live animals. Every page, e-mail, checklist and dosing line
// takes its wording from here, and defers to local codes, product labels and licensed
// professionals.

export const SAFETY_CAUTIONS = {
  label: 'Read and follow the product label',
  children: 'Keep chemicals away from children and pets',
  gloves: 'Wear gloves and eye protection',
  neverMix: 'Never mix products: add each on its own',
  harm: 'Salt and medications can harm plants and some fish',
  electrical: 'Pumps, lights and heaters belong on a ground-fault (GFCI/RCD) protected circuit, installed to local electrical code by a licensed electrician',
  notAlone: 'Do not work alone near deep water: someone knows where you are and when you will be back',
  ice: 'Stay off ice, however thick it looks: work from the bank',
  fishHold: 'Hold fish in pond water, in a shaded and aerated container, and move them gently',
  fishBack: 'On the way back, float the fish until the temperatures match, then release them',
  uvMedication: 'Switch the UV clarifier off while a medication is in the water, as the label says',
  bacteriaMedication: 'Many medications harm the filter\'s beneficial bacteria: add bacteria only after the treatment ends, and watch ammonia and nitrite meanwhile',
  advice: 'Dosing figures are advice worked out from the readings and the volume shown',
} as const

export type SafetyCaution = keyof typeof SAFETY_CAUTIONS

/** Wherever a chemical is dosed, in this order. */
export const CHEMICAL_SAFETY: readonly string[] = [SAFETY_CAUTIONS.gloves, SAFETY_CAUTIONS.neverMix, SAFETY_CAUTIONS.label, SAFETY_CAUTIONS.children]

/** The cautions under any water advice (the water check, the visit report, alert e-mails). */
export const WATER_ADVICE_SAFETY: readonly string[] = [SAFETY_CAUTIONS.advice, ...CHEMICAL_SAFETY, SAFETY_CAUTIONS.harm, SAFETY_CAUTIONS.electrical]

/** Each caution as one sentence. */
export const safetySentence = (text: string) => (/[.!?]$/.test(text) ? text : `${text}.`)
