import { afterAll, describe, expect, it, inject } from 'vitest'
import { readFileSync } from 'node:fs'
import pg from 'pg'
import { legacyRuleToVisitSchedule } from '../../shared/schemas/visit-schedule'
// @ts-expect-error plain ESM script without types
import { runMigrations } from '../../scripts/migrate.mjs'

const admin = inject('adminUrl')
const name = `rillbook_migrate_${Date.now()}`
const urlFor = (db: string) => { const u = new URL(admin); u.pathname = `/${db}`; return u.toString() }

async function adminQuery(sql: string) {
  const c = new pg.Client({ connectionString: admin })
  await c.connect()
  try {
    return await c.query(sql)
  }
  finally {
    await c.end()
  }
}

describe('migrations', () => {
  afterAll(async () => {
    await adminQuery(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`)
  })

  it('apply to an empty database and again as a no-op', async () => {
    await adminQuery(`CREATE DATABASE "${name}"`)
    await runMigrations(urlFor(name))
    await runMigrations(urlFor(name))
    const c = new pg.Client({ connectionString: urlFor(name) })
    await c.connect()
    const { rows } = await c.query(`select table_name from information_schema.tables where table_schema = 'public' order by 1`)
    const cols = await c.query(`select data_type from information_schema.columns where table_schema='public' and column_name like '%_at'`)
    await c.end()
    const tables = rows.map(r => r.table_name)
    for (const t of ['companies', 'users', 'sessions', 'customers', 'audit_log', 'sign_in_failures']) expect(tables).toContain(t)
    // Every *_at column is timestamptz.
    expect(new Set(cols.rows.map(r => r.data_type))).toEqual(new Set(['timestamp with time zone']))
  })

  it('carries old visit rules over to windows the way the app reads them', async () => {
    const c = new pg.Client({ connectionString: urlFor(name) })
    await c.connect()
    const rules = [
      'FREQ=YEARLY;BYMONTH=4;BYDAY=MO;BYSETPOS=2',
      'FREQ=WEEKLY;INTERVAL=2;BYMONTH=5,6,7,8,9;BYDAY=TU',
      'FREQ=MONTHLY;BYMONTH=12,1,2,3;BYDAY=1TU',
      'FREQ=MONTHLY;INTERVAL=3;BYMONTHDAY=10',
      'FREQ=WEEKLY;INTERVAL=3;BYMONTH=3,4,5,6,7,8,9,10,11',
      'FREQ=WEEKLY;INTERVAL=2',
    ]
    try {
      await c.query('BEGIN')
      // Only the templates table matters here: skip the foreign keys inside this transaction.
      await c.query('SET LOCAL session_replication_role = replica')
      for (const [i, rule] of rules.entries()) {
        await c.query(`insert into plan_visit_templates (plan_id, position, visit_type, rrule, duration_minutes) values (gen_random_uuid(), $1, 'routine', $2, 60)`, [i, rule])
      }
      await c.query(readFileSync(new URL('../../drizzle/0012_plan-visit-windows-carry-over.sql', import.meta.url), 'utf8'))
      const { rows } = await c.query('select position, rrule, season_from, season_to, tolerance_days from plan_visit_templates order by position')
      expect(rows.map(r => ({ rrule: r.rrule, from: r.season_from, to: r.season_to, toleranceDays: r.tolerance_days })))
        .toEqual(rules.map(rule => rule === 'FREQ=WEEKLY;INTERVAL=2' ? { rrule: rule, from: '01-01', to: '12-31', toleranceDays: 0 } : legacyRuleToVisitSchedule(rule)))
      expect(rows[2]).toMatchObject({ rrule: 'FREQ=MONTHLY', season_from: '12-01', season_to: '03-31' })
    }
    finally {
      await c.query('ROLLBACK')
      await c.end()
    }
  })
})
