import { and, asc, count, desc, eq, ilike, isNotNull, isNull, or, sql, type SQL } from 'drizzle-orm'
import { equipmentSchema, type FeatureInput, type FeatureUpdateInput } from '../../shared/schemas/features'
import type { FeatureKind, FeatureShape, RangeTable } from '../../shared/types/water'
import {
  DEFAULT_PROFILES, featureSurfaceAreaM2, featureVolumeLitres, mergeRanges, profileKeyForKind,
  turnoverPerHour, WaterInputError,
} from '../../shared/utils/water-chemistry'
import { contractFeatures, customers, doses, photos, rangeProfiles, readings, sites, waterFeatures } from '../db/schema'
import { ownCustomerId, type SessionUser } from '../utils/auth'
import { preparedQuery, useDb } from '../utils/db'
import { httpError } from '../utils/errors'
import { containsPattern } from '../utils/like'
import { recordAudit } from './audit'

type Bound = string | ReturnType<typeof sql.placeholder>
/** The features one may see: the company's; for a customer (`customerId`), their own ones that are not archived. Values or placeholders. */
function scopeWhere(companyId: Bound, customerId: Bound | null): SQL[] {
  const where: SQL[] = [eq(waterFeatures.companyId, companyId)]
  if (customerId !== null) where.push(eq(waterFeatures.customerId, customerId), isNull(waterFeatures.archivedAt))
  return where
}

/** The features `actor` may see: the company's; a customer's own ones that are not archived. */
export function featureScope(actor: SessionUser): SQL[] {
  return scopeWhere(actor.companyId, ownCustomerId(actor))
}

/** Volume used for dosing: the measured figure when the owner entered one. */
const effectiveVolume = sql<number>`coalesce(${waterFeatures.measuredVolumeL}, ${waterFeatures.computedVolumeL})`

const listColumns = {
  id: waterFeatures.id, name: waterFeatures.name, kind: waterFeatures.kind,
  customerId: waterFeatures.customerId, customerName: customers.name,
  siteId: waterFeatures.siteId, siteName: sites.name, siteCity: sites.city,
  volumeL: effectiveVolume, surfaceAreaM2: waterFeatures.surfaceAreaM2,
  archivedAt: waterFeatures.archivedAt, createdAt: waterFeatures.createdAt,
}

export interface FeatureListQuery {
  page: number, pageSize: number, q?: string, sort: 'name' | 'kind' | 'volume' | 'customer' | 'createdAt', dir: 'asc' | 'desc'
  status: 'current' | 'archived' | 'all', kind?: FeatureKind, customerId?: string, siteId?: string
}

export async function listFeatures(actor: SessionUser, q: FeatureListQuery) {
  const db = useDb()
  const where = featureScope(actor)
  if (q.status === 'current') where.push(isNull(waterFeatures.archivedAt))
  if (q.status === 'archived') where.push(isNotNull(waterFeatures.archivedAt))
  if (q.kind) where.push(eq(waterFeatures.kind, q.kind))
  if (q.customerId) where.push(eq(waterFeatures.customerId, q.customerId))
  if (q.siteId) where.push(eq(waterFeatures.siteId, q.siteId))
  if (q.q) {
    const like = containsPattern(q.q)
    where.push(or(ilike(waterFeatures.name, like), ilike(customers.name, like), ilike(sites.name, like), ilike(sites.city, like), ilike(sites.line1, like))!)
  }
  const sortCol = { name: waterFeatures.name, kind: waterFeatures.kind, volume: effectiveVolume, customer: customers.name, createdAt: waterFeatures.createdAt }[q.sort]
  const cond = and(...where)
  const from = () => db.select(listColumns).from(waterFeatures)
    .innerJoin(sites, eq(sites.id, waterFeatures.siteId))
    .innerJoin(customers, eq(customers.id, waterFeatures.customerId))
  const [rows, [total]] = await Promise.all([
    from().where(cond).orderBy(q.dir === 'desc' ? desc(sortCol) : asc(sortCol), asc(waterFeatures.id))
      .limit(q.pageSize).offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(waterFeatures)
      .innerJoin(sites, eq(sites.id, waterFeatures.siteId))
      .innerJoin(customers, eq(customers.id, waterFeatures.customerId)).where(cond),
  ])
  return { rows, total: total?.n ?? 0, page: q.page, pageSize: q.pageSize }
}

/** The range table that applies to a feature: its chosen or its kind's profile, plus its overrides. */
// A feature and its ranges are read for every water check: prepared statements (server/utils/db.ts).
const profileById = preparedQuery(db => db.select({ id: rangeProfiles.id, name: rangeProfiles.name, key: rangeProfiles.key, ranges: rangeProfiles.ranges })
  .from(rangeProfiles).where(and(eq(rangeProfiles.companyId, sql.placeholder('companyId')), eq(rangeProfiles.id, sql.placeholder('profileId')))).limit(1).prepare('range_profile_by_id'))
const profileByKey = preparedQuery(db => db.select({ id: rangeProfiles.id, name: rangeProfiles.name, key: rangeProfiles.key, ranges: rangeProfiles.ranges })
  .from(rangeProfiles).where(and(eq(rangeProfiles.companyId, sql.placeholder('companyId')), eq(rangeProfiles.key, sql.placeholder('key')))).limit(1).prepare('range_profile_by_key'))

export async function rangesFor(companyId: string, feature: { kind: FeatureKind, rangeProfileId: string | null, rangeOverrides: RangeTable }) {
  const key = profileKeyForKind(feature.kind)
  const [profile] = feature.rangeProfileId
    ? await profileById().execute({ companyId, profileId: feature.rangeProfileId })
    : await profileByKey().execute({ companyId, key })
  const base = profile ?? { id: null, ...DEFAULT_PROFILES[key] }
  return { profile: { id: base.id, key: base.key, name: base.name }, ranges: mergeRanges(base.ranges, feature.rangeOverrides) }
}

/** One feature with its site and customer's name: staff see the company's, a customer their own unarchived ones. */
const featureColumns = {
  feature: waterFeatures,
  customerName: customers.name,
  site: { id: sites.id, name: sites.name, line1: sites.line1, city: sites.city, altitudeM: sites.altitudeM, latitude: sites.latitude, longitude: sites.longitude },
}
const staffFeature = preparedQuery(db => db.select(featureColumns).from(waterFeatures)
  .innerJoin(sites, eq(sites.id, waterFeatures.siteId)).innerJoin(customers, eq(customers.id, waterFeatures.customerId))
  .where(and(eq(waterFeatures.id, sql.placeholder('id')), ...scopeWhere(sql.placeholder('companyId'), null))).limit(1).prepare('feature_for_staff'))
const customerFeature = preparedQuery(db => db.select(featureColumns).from(waterFeatures)
  .innerJoin(sites, eq(sites.id, waterFeatures.siteId)).innerJoin(customers, eq(customers.id, waterFeatures.customerId))
  .where(and(eq(waterFeatures.id, sql.placeholder('id')), ...scopeWhere(sql.placeholder('companyId'), sql.placeholder('customerId'))))
  .limit(1).prepare('feature_for_customer'))

const NO_EQUIPMENT = equipmentSchema.parse({})

export async function getFeature(actor: SessionUser, id: string) {
  const own = ownCustomerId(actor)
  const [row] = own
    ? await customerFeature().execute({ id, companyId: actor.companyId, customerId: own })
    : await staffFeature().execute({ id, companyId: actor.companyId })
  if (!row) throw httpError(404, 'No such water feature')
  const { companyId: _c, ...stored } = row.feature
  // A row written before a kind of equipment existed lacks its key: it reads as the default (none).
  const feature = { ...stored, equipment: { ...NO_EQUIPMENT, ...stored.equipment } }
  const volumeL = feature.measuredVolumeL ?? feature.computedVolumeL
  const totalFlowLph = feature.equipment.pumps.reduce((sum, p) => sum + p.ratedFlowLph, 0)
  const { profile, ranges } = await rangesFor(actor.companyId, feature)
  return {
    ...feature,
    customerName: row.customerName,
    site: row.site,
    volumeL,
    totalPumpFlowLph: totalFlowLph,
    turnoverPerHour: totalFlowLph > 0 && volumeL > 0 ? turnoverPerHour(totalFlowLph, volumeL) : null,
    profile,
    ranges,
  }
}

/**
 * The shape as stored (no null shelf) with its volume and area; a shape the maths rejects is a
 * 400 naming the field.
 */
function measure(input: FeatureInput['shape']) {
  const { shelf, ...rest } = input
  const shape = (shelf ? { ...rest, shelf } : rest) as FeatureShape
  try {
    return { shape, computedVolumeL: featureVolumeLitres(shape), surfaceAreaM2: featureSurfaceAreaM2(shape) }
  }
  catch (err) {
    if (err instanceof WaterInputError) {
      const field = err.field.startsWith('shape') ? err.field : `shape.${err.field}`
      throw httpError(400, `Invalid body: ${field} — ${err.message}`, { fields: { [field]: err.message } })
    }
    throw err
  }
}

function ownerOnlyVolume(actor: SessionUser, input: { measuredVolumeL?: number | null }) {
  if (input.measuredVolumeL !== undefined && actor.role !== 'owner') {
    throw httpError(403, 'Only the owner may set a measured volume (measuredVolumeL)', { fields: { measuredVolumeL: 'Only the owner may set this' } })
  }
}

async function checkProfile(actor: SessionUser, rangeProfileId: string | null | undefined) {
  if (!rangeProfileId) return
  const [p] = await useDb().select({ id: rangeProfiles.id }).from(rangeProfiles)
    .where(and(eq(rangeProfiles.id, rangeProfileId), eq(rangeProfiles.companyId, actor.companyId))).limit(1)
  if (!p) throw httpError(400, 'Invalid body: rangeProfileId — no such range profile', { fields: { rangeProfileId: 'No such range profile' } })
}

export async function createFeature(actor: SessionUser, input: FeatureInput, ip: string) {
  ownerOnlyVolume(actor, input)
  const db = useDb()
  const [site] = await db.select({ id: sites.id, customerId: sites.customerId }).from(sites)
    .where(and(eq(sites.id, input.siteId), eq(sites.companyId, actor.companyId))).limit(1)
  if (!site) throw httpError(400, 'Invalid body: siteId — no such site', { fields: { siteId: 'No such site' } })
  await checkProfile(actor, input.rangeProfileId)
  const sizes = measure(input.shape)
  const id = await db.transaction(async (tx) => {
    const [created] = await tx.insert(waterFeatures).values({
      ...input, ...sizes, companyId: actor.companyId, customerId: site.customerId,
      measuredVolumeL: input.measuredVolumeL ?? null, installedOn: input.installedOn ?? null, rangeProfileId: input.rangeProfileId ?? null,
    }).returning({ id: waterFeatures.id })
    await recordAudit(tx, { action: 'feature.created', companyId: actor.companyId, actorUserId: actor.id, subjectType: 'feature', subjectId: created!.id, ip, detail: { siteId: site.id } })
    return created!.id
  })
  return getFeature(actor, id)
}

export async function updateFeature(actor: SessionUser, id: string, input: FeatureUpdateInput, ip: string) {
  ownerOnlyVolume(actor, input)
  const before = await getFeature(actor, id)
  await checkProfile(actor, input.rangeProfileId)
  const { archived, shape, equipment, ...fields } = input
  const sizes = shape ? measure(shape) : {}
  await useDb().transaction(async (tx) => {
    const set = {
      ...fields, ...sizes,
      // Equipment is patched key by key: pumps and the rest stay unless their key is sent.
      ...(equipment && { equipment: { ...before.equipment, ...equipment } }),
      ...(archived !== undefined && { archivedAt: archived ? new Date() : null }),
    }
    if (Object.keys(set).length) await tx.update(waterFeatures).set(set).where(and(eq(waterFeatures.id, id), eq(waterFeatures.companyId, actor.companyId)))
    await recordAudit(tx, {
      action: archived === undefined ? 'feature.updated' : archived ? 'feature.archived' : 'feature.restored',
      companyId: actor.companyId, actorUserId: actor.id, subjectType: 'feature', subjectId: id, ip,
      detail: { fields: Object.keys(input), ...('measuredVolumeL' in input && { measuredVolumeL: input.measuredVolumeL }) },
    })
  })
  return getFeature(actor, id)
}

/** Deletes a feature nothing refers to; one with history (contracts, readings, doses, photos) is archived. */
export async function removeFeature(actor: SessionUser, id: string, ip: string) {
  await getFeature(actor, id)
  const history = await featureHasHistory(id)
  return useDb().transaction(async (tx) => {
    const base = { companyId: actor.companyId, actorUserId: actor.id, subjectType: 'feature', subjectId: id, ip }
    if (history) {
      await tx.update(waterFeatures).set({ archivedAt: new Date() }).where(and(eq(waterFeatures.id, id), eq(waterFeatures.companyId, actor.companyId)))
      await recordAudit(tx, { ...base, action: 'feature.archived' })
      return { id, outcome: 'archived' as const }
    }
    await tx.delete(waterFeatures).where(and(eq(waterFeatures.id, id), eq(waterFeatures.companyId, actor.companyId)))
    await recordAudit(tx, { ...base, action: 'feature.deleted' })
    return { id, outcome: 'deleted' as const }
  })
}

/** True when records that must be kept refer to the feature: contracts, water tests, doses, photos. */
async function featureHasHistory(id: string) {
  const { rows } = await useDb().execute<{ used: boolean }>(sql`select exists (select 1 from ${contractFeatures} where feature_id = ${id})
    or exists (select 1 from ${readings} where feature_id = ${id})
    or exists (select 1 from ${doses} where feature_id = ${id})
    or exists (select 1 from ${photos} where feature_id = ${id}) as used`)
  return !!rows[0]?.used
}
