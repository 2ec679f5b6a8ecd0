// Applies the steps of many readings to the alerts at once: one query loads the open alerts of
// every subject involved, the steps run in memory in order (the same raise/clear rules as one
// reading at a time), and the result is written back with one multi-row insert and one
// multi-row update. Returns the ids of alerts that became `act` (new, or escalated from watch).
import { randomUUID } from 'node:crypto'
import { sql } from 'drizzle-orm'
import type { Tx } from '../utils/db'
import type { Finding, Severity, Step } from './alert-findings'

interface AlertState {
  id: string
  isNew: boolean
  companyId: string
  subjectKey: string
  condition: string
  severity: Severity
  status: 'open' | 'acknowledged' | 'resolved'
  featureId: string | null
  visitId: string | null
  contractId: string | null
  title: string
  detail: string
  value: number | null
  firstSeenAt: Date
  lastSeenAt: Date
  closedAt: Date | null
  note: string
  changed: boolean
}

const subjectOf = (companyId: string, subjectKey: string) => `${companyId}|${subjectKey}`

/** `steps` in the order they happen; each step carries its company (raises) or takes it from `companyOf`. */
export async function applyAlertSteps(tx: Tx, steps: ReadonlyArray<Step & { companyId: string }>, now: Date): Promise<string[]> {
  if (!steps.length) return []
  const wanted = [...new Map(steps.map(s => [subjectOf(s.companyId, s.subjectKey), { c: s.companyId, k: s.subjectKey }])).values()]
  const { rows } = await tx.execute<{ id: string, company_id: string, subject_key: string, condition: string, severity: Severity, status: 'open' | 'acknowledged', feature_id: string | null, visit_id: string | null, contract_id: string | null, title: string, detail: string, value: number | null, first_seen_at: string | Date, last_seen_at: string | Date, note: string }>(sql`
    select a.id, a.company_id, a.subject_key, a.condition, a.severity, a.status, a.feature_id, a.visit_id, a.contract_id, a.title, a.detail, a.value, a.first_seen_at, a.last_seen_at, a.note
    from alerts a join jsonb_to_recordset(${JSON.stringify(wanted)}::jsonb) as w(c uuid, k text) on a.company_id = w.c and a.subject_key = w.k
    where a.status <> 'resolved'`)
  const open = new Map<string, AlertState>()
  for (const a of rows) {
    open.set(subjectOf(a.company_id, a.subject_key), {
      id: a.id, isNew: false, companyId: a.company_id, subjectKey: a.subject_key, condition: a.condition, severity: a.severity, status: a.status,
      featureId: a.feature_id, visitId: a.visit_id, contractId: a.contract_id, title: a.title, detail: a.detail, value: a.value,
      firstSeenAt: new Date(a.first_seen_at), lastSeenAt: new Date(a.last_seen_at), closedAt: null, note: a.note, changed: false,
    })
  }
  const touched: AlertState[] = []
  const notify: string[] = []
  for (const s of steps) {
    const key = subjectOf(s.companyId, s.subjectKey)
    const cur = open.get(key)
    if (s.finding) {
      const f: Finding = s.finding
      if (cur) {
        if (cur.severity === 'watch' && f.severity === 'act') notify.push(cur.id)
        Object.assign(cur, { severity: f.severity, title: f.title, detail: f.detail ?? '', value: f.value ?? null, lastSeenAt: now, changed: true })
        continue
      }
      const row: AlertState = {
        id: randomUUID(), isNew: true, companyId: f.companyId, subjectKey: f.subjectKey, condition: f.condition, severity: f.severity, status: 'open',
        featureId: f.featureId ?? null, visitId: f.visitId ?? null, contractId: f.contractId ?? null, title: f.title, detail: f.detail ?? '', value: f.value ?? null,
        firstSeenAt: now, lastSeenAt: now, closedAt: null, note: '', changed: true,
      }
      open.set(key, row)
      touched.push(row)
      if (row.severity === 'act') notify.push(row.id)
    }
    else if (cur) {
      Object.assign(cur, { status: 'resolved', closedAt: now, note: s.clearNote, changed: true })
      open.delete(key)
      if (!cur.isNew) touched.push(cur)
    }
  }
  for (const a of open.values()) if (!a.isNew && a.changed) touched.push(a)
  const inserts = touched.filter(a => a.isNew)
  const updates = [...new Set(touched.filter(a => !a.isNew))]
  if (inserts.length) {
    await tx.execute(sql`
      insert into alerts (id, company_id, subject_key, condition, severity, status, feature_id, visit_id, contract_id, title, detail, value, first_seen_at, last_seen_at, closed_at, note)
      select v.id, v.company_id, v.subject_key, v.condition, v.severity::alert_severity, v.status::alert_status, v.feature_id, v.visit_id, v.contract_id, v.title, v.detail, v.value, v.first_seen_at, v.last_seen_at, v.closed_at, v.note
      from jsonb_to_recordset(${JSON.stringify(inserts.map(asRecord))}::jsonb) as v(id uuid, company_id uuid, subject_key text, condition text, severity text, status text, feature_id uuid, visit_id uuid, contract_id uuid, title text, detail text, value double precision, first_seen_at timestamptz, last_seen_at timestamptz, closed_at timestamptz, note text)`)
  }
  if (updates.length) {
    await tx.execute(sql`
      update alerts a set severity = v.severity::alert_severity, status = v.status::alert_status, title = v.title, detail = v.detail, value = v.value, last_seen_at = v.last_seen_at, closed_at = coalesce(v.closed_at, a.closed_at), note = v.note, updated_at = now()
      from jsonb_to_recordset(${JSON.stringify(updates.map(asRecord))}::jsonb) as v(id uuid, severity text, status text, title text, detail text, value double precision, last_seen_at timestamptz, closed_at timestamptz, note text)
      where a.id = v.id`)
  }
  return notify
}

function asRecord(a: AlertState) {
  return {
    id: a.id, company_id: a.companyId, subject_key: a.subjectKey, condition: a.condition, severity: a.severity, status: a.status, feature_id: a.featureId, visit_id: a.visitId, contract_id: a.contractId,
    title: a.title, detail: a.detail, value: a.value, first_seen_at: a.firstSeenAt.toISOString(), last_seen_at: a.lastSeenAt.toISOString(), closed_at: a.closedAt?.toISOString() ?? null, note: a.note,
  }
}
