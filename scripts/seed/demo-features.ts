// Invented sites and water features for the demo company. Sizes in metres; coordinates are
// invented points around the invented town of Larchfield.
import type { FeatureEquipment, FishStock } from '../../shared/schemas/features'
import type { FeatureKind, FeatureShape } from '../../shared/types/water'

export interface DemoSite {
  key: string
  customerKey: string
  name: string
  line1: string
  city: string
  postcode: string
  latitude: number
  longitude: number
  altitudeM: number
  accessNotes: string
  gateCode: string
  hazards: string[]
  hazardNotes: string
}

export interface DemoFeature {
  key: string
  siteKey: string
  name: string
  kind: FeatureKind
  shape: FeatureShape
  measuredVolumeL?: number
  equipment: FeatureEquipment
  fish: FishStock[]
  plants: string
  notes: string
  installedOn: string
}

/**
 * The invented town's neighbourhoods: a centre, a radius in km and their streets. Each site lies
 * in one, so a technician's day can stay in one part of town (the planner clusters by area).
 */
const AREAS = [
  { name: 'Old Town', lat: 44.141, lon: -91.352, km: 1.0, postcode: '54100', streets: ['Fenwick Street', 'Cressway', 'Iris Walk'] },
  { name: 'Millbrook', lat: 44.166, lon: -91.322, km: 1.2, postcode: '54111', streets: ['Kingfisher Way', 'Lily Mead', 'Millbrook Commons'] },
  { name: 'Fern Hollow', lat: 44.116, lon: -91.381, km: 1.2, postcode: '54122', streets: ['Hornbeam Close', 'Juniper Rise', 'Fern Hollow Drive'] },
  { name: 'Ashgrove', lat: 44.172, lon: -91.379, km: 1.1, postcode: '54133', streets: ['Alder Row', 'Goldcrest Avenue', 'Ashgrove Lane'] },
  { name: 'Heron Flats', lat: 44.119, lon: -91.318, km: 1.1, postcode: '54144', streets: ['Bittern Lane', 'Damselfly Court', 'Eelgrass Road'] },
] as const

/** The neighbourhood of a customer: the named places where they are, households round the town. */
function areaOf(customerKey: string, i: number) {
  const fixed: Record<string, string> = {
    'customer-ashgrove': 'Ashgrove', 'customer-millbrook-hoa': 'Millbrook', 'customer-fernhollow-hoa': 'Fern Hollow',
    'customer-lantern-court': 'Old Town', 'customer-larchfield-library': 'Old Town', 'customer-copperleaf': 'Old Town',
  }
  return AREAS.find(a => a.name === fixed[customerKey]) ?? AREAS[i % AREAS.length]!
}

/** A small deterministic generator so re-seeding yields the same data. */
function seq(seed: number) {
  let x = seed
  return () => {
    x = (x * 1103515245 + 12345) % 2147483648
    return x / 2147483648
  }
}

const baseEquipment = (over: Partial<FeatureEquipment>): FeatureEquipment => ({
  pumps: [], intake: 'none', biologicalFilter: false, wetlandFilter: false, uvClarifier: null,
  aerator: false, deIcer: false, autoDosing: false, ionizer: false, notes: '', ...over,
})

export function demoSitesAndFeatures(customerKeys: string[]) {
  const sites: DemoSite[] = []
  const features: DemoFeature[] = []
  const rnd = seq(20260401)
  const spot = seq(20260402)
  /** A point within the area's radius (km → degrees at this latitude: 111 km a degree of latitude). */
  const at = (area: (typeof AREAS)[number]) => {
    const r = area.km * Math.sqrt(spot())
    const a = 2 * Math.PI * spot()
    const round = (x: number) => Math.round(x * 100_000) / 100_000
    return { latitude: round(area.lat + (r * Math.sin(a)) / 111), longitude: round(area.lon + (r * Math.cos(a)) / (111 * Math.cos((area.lat * Math.PI) / 180))) }
  }

  customerKeys.forEach((ck, i) => {
    const siteKey = `site-${ck}`
    const area = areaOf(ck, i)
    const street = area.streets[Math.floor(i / AREAS.length) % area.streets.length]!
    const number = 12 + ((i * 17) % 480)
    const dogs = i % 5 === 1
    sites.push({
      key: siteKey, customerKey: ck, name: ck.includes('ashgrove') ? 'Garden grounds' : ck.includes('lantern') ? 'Courtyard' : ck.includes('hoa') ? 'Entrance commons' : 'Home',
      line1: `${number} ${street}`, city: 'Larchfield', postcode: area.postcode,
      ...at(area), altitudeM: 240 + (i % 7) * 12,
      accessNotes: i % 3 === 0 ? 'Side gate on the left of the garage; park on the street.' : 'Ring the bell; the path round the back is uneven.',
      gateCode: i % 2 === 0 ? `${1000 + ((i * 7919) % 9000)}#` : '',
      hazards: [...(dogs ? ['dogs'] : []), ...(i % 4 === 0 ? ['deep_water'] : []), ...(i % 9 === 2 ? ['overhead_lines'] : [])],
      hazardNotes: dogs ? 'Friendly dog in the yard; ask for it to be brought in.' : '',
    })
  })

  const koi = (key: string, siteKey: string, name: string, l: number, w: number, d: number, fishCount: number, installedOn: string): DemoFeature => ({
    key, siteKey, name, kind: 'koi_pond', installedOn,
    shape: { kind: 'rectangle', lengthM: l, widthM: w, depthM: d, shelf: { lengthM: 2 * (l + w) * 0.5, widthM: 0.3, depthM: 0.25 } },
    equipment: baseEquipment({
      pumps: [{ name: 'Filter pump', role: 'filter', ratedFlowLph: Math.round(l * w * d * 1000 * 1.1 / 100) * 100 }, { name: 'Waterfall pump', role: 'waterfall', ratedFlowLph: 9000 }],
      intake: 'skimmer', biologicalFilter: true, uvClarifier: { watts: 36, bulbInstalledOn: '2025-04-10' }, aerator: true, deIcer: true,
    }),
    fish: [{ kind: 'koi', count: fishCount }], plants: 'Water lilies, pickerel rush on the shelf', notes: '', 
  })

  for (const [i, ck] of customerKeys.entries()) {
    const siteKey = `site-${ck}`
    const r = rnd()
    if (ck === 'customer-whitcombe') {
      features.push({ ...koi('feature-whitcombe-koi', siteKey, 'Koi pond', 5.5, 3.6, 1.4, 14, '2019-05-20'), notes: 'Two koi over 60 cm; owner feeds twice daily in summer.' })
      continue
    }
    if (ck === 'customer-ashgrove') {
      features.push({
        key: 'feature-ashgrove-stream', siteKey, name: 'Meadow stream', kind: 'stream', installedOn: '2021-06-02',
        shape: { kind: 'irregular', lengthM: 18, widthM: 0.9, avgDepthM: 0.15 },
        equipment: baseEquipment({ pumps: [{ name: 'Stream pump', role: 'stream', ratedFlowLph: 15000 }], intake: 'intake_bay', biologicalFilter: true }),
        fish: [], plants: 'Marsh marigold, sedges, watercress along the margins', notes: 'Runs from the pergola down to the lower pool; volunteers top up in summer.',
      })
      features.push({
        key: 'feature-ashgrove-wetland', siteKey, name: 'Wetland filter bed', kind: 'wetland_filter', installedOn: '2021-06-02',
        shape: { kind: 'rectangle', lengthM: 4, widthM: 2.5, depthM: 0.45 },
        equipment: baseEquipment({ wetlandFilter: true, pumps: [], notes: 'Gravel bed fed by the stream pump; cleanout port at the east end.' }),
        fish: [], plants: 'Iris, rush, water mint', notes: '',
      })
      continue
    }
    if (ck === 'customer-lantern-court') {
      features.push({ ...koi('feature-lantern-koi', siteKey, 'Courtyard koi pond', 7, 4, 1.5, 22, '2018-04-11'), measuredVolumeL: 39500, notes: 'Measured volume from the fill-up meter, spring 2024.' })
      features.push({
        key: 'feature-lantern-urn', siteKey, name: 'Lobby urn fountain', kind: 'fountain', installedOn: '2022-03-15',
        shape: { kind: 'circle', diameterM: 1.2, depthM: 0.35 },
        equipment: baseEquipment({ pumps: [{ name: 'Urn pump', role: 'fountain', ratedFlowLph: 1800 }], autoDosing: true }),
        fish: [], plants: '', notes: 'Basin under the cobbles; reservoir fill valve behind the planter.',
      })
      continue
    }
    if (ck.endsWith('-hoa')) {
      features.push({
        key: `feature-${ck}-garden`, siteKey, name: 'Entrance water garden', kind: 'water_garden', installedOn: '2017-07-01',
        shape: { kind: 'oval', lengthM: 9, widthM: 5, depthM: 0.9, shelf: { lengthM: 14, widthM: 0.4, depthM: 0.3 } },
        equipment: baseEquipment({ pumps: [{ name: 'Main pump', role: 'waterfall', ratedFlowLph: 22000 }], intake: 'skimmer', biologicalFilter: true, aerator: true, ionizer: ck.includes('millbrook') }),
        fish: [{ kind: 'goldfish', count: 30 }, { kind: 'golden orfe', count: 6 }], plants: 'Lilies, lotus, cattails', notes: 'Board asks for a short report each visit.',
      })
      features.push({
        key: `feature-${ck}-pondless`, siteKey, name: 'Sign wall pondless waterfall', kind: 'pondless_waterfall', installedOn: '2020-05-12',
        shape: { kind: 'rectangle', lengthM: 2.4, widthM: 1.5, depthM: 0.6 },
        equipment: baseEquipment({ pumps: [{ name: 'Vault pump', role: 'waterfall', ratedFlowLph: 12000 }], autoDosing: true, notes: 'Pump vault lid under the flat stone by the sign.' }),
        fish: [], plants: '', notes: '',
      })
      continue
    }
    if (ck === 'customer-copperleaf') {
      features.push({
        key: 'feature-copperleaf-fountain', siteKey, name: 'Waiting-room wall fountain', kind: 'fountain', installedOn: '2023-02-20',
        shape: { kind: 'rectangle', lengthM: 1.5, widthM: 0.4, depthM: 0.2 },
        equipment: baseEquipment({ pumps: [{ name: 'Wall pump', role: 'fountain', ratedFlowLph: 900 }] }),
        fish: [], plants: '', notes: 'Indoors; top up with dechlorinated water only.',
      })
      continue
    }
    // Households and the library: a mix of kinds and sizes.
    const kindPick = i % 4
    if (kindPick === 0) {
      features.push(koi(`feature-${ck}-koi`, siteKey, 'Koi pond', 3.5 + r * 3, 2.4 + r * 1.5, 1.1 + r * 0.4, 6 + Math.round(r * 12), `20${15 + (i % 9)}-05-0${1 + (i % 8)}`))
    }
    else if (kindPick === 1) {
      features.push({
        key: `feature-${ck}-garden`, siteKey, name: 'Water garden', kind: 'water_garden', installedOn: `20${14 + (i % 10)}-06-1${i % 9}`,
        shape: { kind: 'irregular', lengthM: 4 + r * 3, widthM: 2.5 + r * 2, avgDepthM: 0.6 + r * 0.2, shelf: { lengthM: 6, widthM: 0.3, depthM: 0.25 } },
        equipment: baseEquipment({ pumps: [{ name: 'Waterfall pump', role: 'waterfall', ratedFlowLph: 6000 + Math.round(r * 60) * 100 }], intake: 'skimmer', biologicalFilter: true, uvClarifier: i % 3 === 0 ? { watts: 18, bulbInstalledOn: '2024-04-02' } : null }),
        fish: [{ kind: 'goldfish', count: 5 + (i % 12) }], plants: 'Lilies, marginal plants', notes: '',
      })
    }
    else if (kindPick === 2) {
      features.push({
        key: `feature-${ck}-pondless`, siteKey, name: 'Pondless waterfall', kind: 'pondless_waterfall', installedOn: `20${16 + (i % 8)}-04-2${i % 9}`,
        shape: { kind: 'rectangle', lengthM: 2 + r, widthM: 1.2 + r * 0.6, depthM: 0.6 },
        equipment: baseEquipment({ pumps: [{ name: 'Vault pump', role: 'waterfall', ratedFlowLph: 7500 }], autoDosing: i % 2 === 0 }),
        fish: [], plants: '', notes: '',
      })
    }
    else {
      features.push({
        key: `feature-${ck}-stream`, siteKey, name: 'Garden stream and pool', kind: 'stream', installedOn: `20${17 + (i % 7)}-05-1${i % 9}`,
        shape: { kind: 'irregular', lengthM: 8 + r * 6, widthM: 0.8 + r * 0.4, avgDepthM: 0.2 },
        equipment: baseEquipment({ pumps: [{ name: 'Stream pump', role: 'stream', ratedFlowLph: 9000 }], intake: 'intake_bay', biologicalFilter: true }),
        fish: [], plants: 'Marginal plants', notes: '',
      })
      if (i % 8 === 3) {
        features.push({
          key: `feature-${ck}-wetland`, siteKey, name: 'Bog filter', kind: 'wetland_filter', installedOn: `20${17 + (i % 7)}-05-1${i % 9}`,
          shape: { kind: 'rectangle', lengthM: 2, widthM: 1.5, depthM: 0.4 },
          equipment: baseEquipment({ wetlandFilter: true }), fish: [], plants: 'Iris, sedges', notes: '',
        })
      }
    }
  }
  return { sites, features }
}
