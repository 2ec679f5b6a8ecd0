// What one water test says about each alert subject of its feature: a finding that raises (or
// updates) the subject's alert, or a clear. Pure: the alert scan and its tests share it, so the
// scan's batching can be checked against a reading-by-reading reference over the same findings.
import type { ParameterEvaluation } from '../../shared/types/water'
import { dailyWaterLossMm, EVAPORATION_ALLOWANCE_MM_PER_DAY, waterLossStatus } from '../../shared/utils/water-chemistry'
import { formatNumber, formatQuantity, toDisplay, unitFor, type UnitSystem } from '../../shared/utils/water/format'
import { formatParameter } from '../../shared/utils/water/parameters'

/** Rules of thumb (common practice, no source) unless marked. */
export const ALERT_RULES = {
  /** EU Directive 2006/44/EC, Annex I: artificial pH variation within ±0.5 (published). */
  pHDropWatch: 0.5,
  pHDropAct: 1.0,
  temperatureSwingC: 5,
  temperatureSwingHours: 48,
  uvBulbMonths: 12,
  renewalWindowDays: 60,
  overdueLookbackDays: 30,
} as const

export type Severity = 'watch' | 'act'
export interface Finding { companyId: string, subjectKey: string, condition: string, severity: Severity, title: string, detail?: string, value?: number | null, featureId?: string | null, visitId?: string | null, contractId?: string | null }

/** A raise (`finding`) or a clear (`clearNote`) of one subject. */
export type Step = { subjectKey: string, finding: Finding, clearNote?: undefined } | { subjectKey: string, finding?: undefined, clearNote: string }

export interface ScannedReading {
  id: string
  companyId: string
  featureId: string
  visitId: string | null
  takenAt: Date
  pH: number | null
  temperatureC: number | null
  khMgL: number | null
  waterLevelMm: number | null
  evaluation: ParameterEvaluation[]
}

export interface PreviousReading { pH: number | null, temperatureC: number | null, khMgL: number | null, waterLevelMm: number | null, takenAt: Date }

export interface ReadingContext {
  /** The feature's reading before this one (by the time it was taken), if any. */
  prev: PreviousReading | null
  /** The feature's newest reading of this scan: only it clears (older ones only raise). */
  isLatest: boolean
  units: UnitSystem
  /** Top-up water added between `prev` and this reading, in mm of level (water loss; latest only). */
  addedMm: number
}

/** The steps one reading makes, in a fixed order. */
export function readingSteps(r: ScannedReading, ctx: ReadingContext): Step[] {
  const steps: Step[] = []
  const raise = (finding: Omit<Finding, 'companyId'>) => steps.push({ subjectKey: finding.subjectKey, finding: { companyId: r.companyId, ...finding } })
  const clear = (subjectKey: string, clearNote: string) => {
    if (ctx.isLatest) steps.push({ subjectKey, clearNote })
  }
  for (const p of r.evaluation) {
    const key = `reading:${r.featureId}:${p.parameter}`
    if (p.status === 'ok') clear(key, 'Back in range at a later reading')
    else raise({ subjectKey: key, condition: `reading.${p.parameter}`, severity: p.status, title: p.reason, value: p.value, featureId: r.featureId, visitId: r.visitId })
  }
  const { prev, units } = ctx
  if (!prev) return steps
  const f = r.featureId
  if (r.pH != null && prev.pH != null) {
    const drop = prev.pH - r.pH
    if (drop > ALERT_RULES.pHDropWatch) raise({ subjectKey: `trend:${f}:ph_drop`, condition: 'trend.ph_drop', severity: drop > ALERT_RULES.pHDropAct ? 'act' : 'watch', title: `pH fell by ${drop.toFixed(1)} since the last test (${prev.pH} → ${r.pH}): check KH and what went in`, value: drop, featureId: f, visitId: r.visitId })
    else clear(`trend:${f}:ph_drop`, 'pH steady at a later reading')
  }
  const khFloor = r.evaluation.find(e => e.parameter === 'khMgL')
  if (r.khMgL != null && prev.khMgL != null) {
    if (r.khMgL < prev.khMgL && khFloor && khFloor.status !== 'ok') raise({ subjectKey: `trend:${f}:kh_falling`, condition: 'trend.kh_falling', severity: khFloor.status, title: `KH is low and falling (${formatParameter('khMgL', prev.khMgL, units, { bare: true })} → ${formatParameter('khMgL', r.khMgL, units)}): pH may crash`, value: r.khMgL, featureId: f, visitId: r.visitId })
    else clear(`trend:${f}:kh_falling`, 'KH no longer low and falling')
  }
  const gapMs = r.takenAt.getTime() - prev.takenAt.getTime()
  if (r.temperatureC != null && prev.temperatureC != null && gapMs <= ALERT_RULES.temperatureSwingHours * 3600_000) {
    const swing = Math.abs(r.temperatureC - prev.temperatureC)
    // A change of temperature in the reader's degrees: the difference of the two shown values.
    const shownSwing = Math.abs(toDisplay('temperature', r.temperatureC, units) - toDisplay('temperature', prev.temperatureC, units))
    if (swing > ALERT_RULES.temperatureSwingC) raise({ subjectKey: `trend:${f}:temperature_swing`, condition: 'trend.temperature_swing', severity: 'watch', title: `Water temperature changed ${formatNumber(shownSwing, 1)} ${unitFor('temperature', units)} within ${Math.round(gapMs / 3600_000)} h: stress for fish`, value: swing, featureId: f })
    else clear(`trend:${f}:temperature_swing`, 'Temperature steady')
  }
  // Water loss from the level readings, adding back top-ups between them (the newest reading only).
  if (r.waterLevelMm != null && prev.waterLevelMm != null && ctx.isLatest) {
    const perDay = dailyWaterLossMm([{ at: prev.takenAt, levelMm: prev.waterLevelMm, addedMm: ctx.addedMm }, { at: r.takenAt, levelMm: r.waterLevelMm }])
    const status = perDay == null ? 'ok' : waterLossStatus(perDay)
    if (status !== 'ok') raise({ subjectKey: `water_loss:${f}`, condition: 'water_loss', severity: status, title: `Losing ${formatQuantity('level', perDay!, units)} of water a day, more than evaporation (about ${formatQuantity('level', EVAPORATION_ALLOWANCE_MM_PER_DAY, units)}): look for a leak`, value: perDay, featureId: f })
    else clear(`water_loss:${f}`, 'Water loss within the evaporation allowance')
  }
  return steps
}
