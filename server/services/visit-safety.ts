// The safety items a visit's checklist carries where they apply (PRODUCT.md, Safety). Every
// checklist a visit gets — generated from a plan, booked from a request or from an alert — passes
// through `withSafety`, so the cautions live here once. Thresholds are common practice, no source.
import { SAFETY_CAUTIONS } from '../../shared/utils/safety'
import { and, eq, isNull } from 'drizzle-orm'
import type { ChecklistItem, VisitType } from '../../shared/types/schedule'
import type { FeatureShape } from '../../shared/types/water'
import { waterFeatures } from '../db/schema'
import type { Tx } from '../utils/db'

/** Water at least this deep (metres) counts as deep: nobody works alone beside it (common practice, no source). */
export const DEEP_WATER_M = 0.6

/** Checklist items, worded from the one list of cautions (shared/utils/safety.ts). */
export const SAFETY_ITEMS = {
  chemicals: `Safety: ${SAFETY_CAUTIONS.gloves.toLowerCase()}; ${SAFETY_CAUTIONS.neverMix.toLowerCase()}`,
  notAlone: `Safety: ${SAFETY_CAUTIONS.notAlone.toLowerCase()}`,
  ice: `Safety: ${SAFETY_CAUTIONS.ice.toLowerCase()}`,
  fish: SAFETY_CAUTIONS.fishHold,
  fishBack: SAFETY_CAUTIONS.fishBack,
  medications: `Treatments: ${SAFETY_CAUTIONS.uvMedication.toLowerCase()}; ${SAFETY_CAUTIONS.bacteriaMedication.toLowerCase()}`,
} as const

/** Visit types at which a technician may dose a chemical (tests, top-ups, treatments). */
const DOSING_VISITS: readonly VisitType[] = ['spring_cleanout', 'routine', 'water_test', 'fall_shutdown', 'repair']
/** Visit types that work in or over the water (draining, netting, pulling pumps). */
const IN_WATER_VISITS: readonly VisitType[] = ['spring_cleanout', 'fall_shutdown', 'net_install', 'repair']

export interface SafetyContext {
  visitType: VisitType
  /** Company-local date of the visit. */
  date: string
  /** The deepest water (metres) among the features visited; null when unknown. */
  deepestM: number | null
  /** The company's latitude (southern winters fall in June–August); null: northern. */
  latitude?: number | null
  /** The visit treats the water (a retest after an alert, a fish problem). */
  treatment?: boolean
}

/** The deepest point of a feature's shape, metres. */
export function shapeDepthM(shape: FeatureShape): number {
  const main = 'avgDepthM' in shape ? shape.avgDepthM : shape.depthM
  return Math.max(main, shape.shelf?.depthM ?? 0)
}

/** The deepest water among a site's current features, metres (null: none recorded). */
export async function deepestAtSite(tx: Tx, siteId: string): Promise<number | null> {
  const rows = await tx.select({ shape: waterFeatures.shape }).from(waterFeatures).where(and(eq(waterFeatures.siteId, siteId), isNull(waterFeatures.archivedAt)))
  return rows.length ? Math.max(...rows.map(r => shapeDepthM(r.shape))) : null
}

/** Winter months where the company works: December–February north of the equator, June–August south. */
export function isWinter(date: string, latitude?: number | null): boolean {
  const month = Number(date.slice(5, 7))
  return (latitude ?? 0) < 0 ? [6, 7, 8].includes(month) : [12, 1, 2].includes(month)
}

/** The safety items for a visit, in the order a technician meets them. */
export function safetyItems(ctx: SafetyContext): string[] {
  const out: string[] = []
  if (isWinter(ctx.date, ctx.latitude)) out.push(SAFETY_ITEMS.ice)
  if ((ctx.deepestM ?? 0) >= DEEP_WATER_M || IN_WATER_VISITS.includes(ctx.visitType)) out.push(SAFETY_ITEMS.notAlone)
  if (ctx.visitType === 'spring_cleanout') out.push(SAFETY_ITEMS.fish, SAFETY_ITEMS.fishBack)
  if (DOSING_VISITS.includes(ctx.visitType) || ctx.treatment) out.push(SAFETY_ITEMS.chemicals)
  if (ctx.treatment) out.push(SAFETY_ITEMS.medications)
  return out
}

/** A visit's checklist with its safety items first (an item already there is not repeated). */
export function withSafety(labels: readonly string[], ctx: SafetyContext): ChecklistItem[] {
  const safety = safetyItems(ctx).filter(s => !labels.includes(s))
  return [...safety, ...labels].map(label => ({ label, state: null }))
}
