// Invented water tests for the demo's finished visits: seasonal temperatures, a gentle pH and KH
// drift, and a few out-of-range episodes (an ammonia spike, low KH, a nitrite bloom, low oxygen).
import { and, asc, eq, inArray } from 'drizzle-orm'
import { companies, contractFeatures, sites, visits, waterFeatures, type readings } from '../../server/db/schema'
import { evaluateAtSite, insertReadingsOnce, readingRow } from '../../server/services/readings'
import type { Tx } from '../../server/utils/db'
import { DEFAULT_PROFILES, mergeRanges, profileKeyForKind } from '../../shared/utils/water-chemistry'

function rand(seed: string) {
  let h = 2166136261
  for (const c of seed) h = Math.imul(h ^ c.charCodeAt(0), 16777619)
  return () => {
    h = Math.imul(h ^ (h >>> 15), 2246822507)
    h = Math.imul(h ^ (h >>> 13), 3266489909)
    return ((h ^= h >>> 16) >>> 0) / 4294967296
  }
}

/** A stable UUID from a key (same layout as the seed's demoId). */
type IdFor = (key: string) => string

/** Readings for the finished visits of the contracts the seed just created (none on a re-run). */
export async function seedReadings(tx: Tx, companyId: string, idFor: IdFor, contractIds: string[]) {
  if (!contractIds.length) return 0
  const done = await tx.select({ id: visits.id, contractId: visits.contractId, siteId: visits.siteId, startedAt: visits.startedAt, scheduledOn: visits.scheduledOn })
    .from(visits).where(and(eq(visits.companyId, companyId), eq(visits.status, 'done'), inArray(visits.contractId, contractIds))).orderBy(asc(visits.scheduledOn))
  const features = await tx.select({ contractId: contractFeatures.contractId, id: waterFeatures.id, siteId: waterFeatures.siteId, kind: waterFeatures.kind, fish: waterFeatures.fish, altitudeM: sites.altitudeM })
    .from(contractFeatures).innerJoin(waterFeatures, eq(waterFeatures.id, contractFeatures.featureId)).innerJoin(sites, eq(sites.id, waterFeatures.siteId)).where(inArray(contractFeatures.contractId, contractIds))
  const [company] = await tx.select({ unitSystem: companies.unitSystem }).from(companies).where(eq(companies.id, companyId)).limit(1)
  const rows: Array<typeof readings.$inferInsert> = []
  for (const v of done) {
    for (const f of features.filter(x => x.contractId === v.contractId && x.siteId === v.siteId)) {
      const r = rand(`${v.id}:${f.id}`)
      const day = new Date(`${v.scheduledOn}T12:00:00Z`)
      const doy = Math.floor((day.getTime() - Date.UTC(day.getUTCFullYear(), 0, 0)) / 86_400_000)
      const temperatureC = Math.max(1, Number((14 + 11 * Math.sin(((doy - 110) / 365) * 2 * Math.PI) + (r() - 0.5) * 3).toFixed(1)))
      const fishPond = f.fish.some(x => x.count > 0)
      const episode = r()
      const reading = {
        temperatureC,
        pH: Number((7.6 + (r() - 0.5) * 0.8 - (episode < 0.04 ? 0.9 : 0)).toFixed(1)),
        totalAmmoniaMgL: fishPond ? Number((episode > 0.96 ? 0.8 + r() : r() * 0.2).toFixed(2)) : null,
        nitriteMgL: fishPond ? Number((episode > 0.93 && episode <= 0.96 ? 0.3 + r() * 0.3 : r() * 0.05).toFixed(2)) : null,
        nitrateMgL: fishPond ? Number((5 + r() * 25).toFixed(0)) : null,
        khMgL: Number((episode < 0.04 ? 30 + r() * 20 : 90 + r() * 80).toFixed(0)),
        dissolvedOxygenMgL: fishPond ? Number(((temperatureC > 24 && episode < 0.15 ? 4.5 : 7.5) + r() * 2).toFixed(1)) : null,
        ammoniaBasis: 'N' as const,
      }
      const ranges = mergeRanges(DEFAULT_PROFILES[profileKeyForKind(f.kind)].ranges, {})
      const e = evaluateAtSite(reading, { ranges, altitudeM: f.altitudeM, unitSystem: company!.unitSystem })
      rows.push(readingRow({
        id: idFor(`reading-${v.id}-${f.id}`), companyId, featureId: f.id, visitId: v.id, source: 'technician', enteredBy: null,
        takenAt: v.startedAt ?? new Date(`${v.scheduledOn}T15:00:00Z`),
      }, reading, e))
    }
  }
  return insertReadingsOnce(tx, rows)
}
