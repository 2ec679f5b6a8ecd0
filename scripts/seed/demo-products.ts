// The demo company's treatment catalogue. Products are named by what they are; the label rates are
// invented demo values — a real company enters the rate printed on its own product's label.
export const demoProducts = [
  {
    key: 'product-dechlorinator', name: 'Dechlorinator (sodium thiosulfate solution)', kind: 'dechlorinator' as const,
    labelAmount: 5, labelUnit: 'mL', labelPerLitres: 378.5,
    cautions: ['Treat the whole top-up volume', 'Chloraminated tap water releases ammonia: retest ammonia after a big top-up'],
  },
  {
    key: 'product-bacteria', name: 'Beneficial bacteria (liquid, weekly)', kind: 'bacteria' as const,
    labelAmount: 30, labelUnit: 'mL', labelPerLitres: 3785,
    cautions: ['Do not add while the UV clarifier has just been cleaned or while treating with medication'],
  },
  {
    key: 'product-bicarbonate', name: 'Sodium bicarbonate (KH buffer)', kind: 'kh_buffer' as const,
    labelAmount: 29.96, labelUnit: 'g', labelPerLitres: 1000,
    cautions: ['Raise KH by no more than about 1 dKH a day', 'Dissolve in a bucket of pond water first'],
  },
  {
    key: 'product-salt', name: 'Pond salt (sodium chloride, no additives)', kind: 'salt' as const,
    labelAmount: 1, labelUnit: 'kg', labelPerLitres: 1000,
    cautions: ['Salt harms many plants and some fish', 'Salt does not evaporate: only water changes lower it'],
  },
]
