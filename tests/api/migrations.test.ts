import { afterAll, describe, expect, it, inject } from 'vitest'
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { drizzle } from 'drizzle-orm/node-postgres'
import { migrate } from 'drizzle-orm/node-postgres/migrator'
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

  it('apply once when several instances deploy at the same time', async () => {
    const together = `${name}_together`
    await adminQuery(`CREATE DATABASE "${together}"`)
    try {
      await Promise.all([1, 2, 3].map(() => runMigrations(urlFor(together))))
      const c = new pg.Client({ connectionString: urlFor(together) })
      await c.connect()
      const { rows } = await c.query('select count(*)::int as n, count(distinct hash)::int as hashes from drizzle.__drizzle_migrations')
      await c.end()
      const journal = JSON.parse(readFileSync(new URL('../../drizzle/meta/_journal.json', import.meta.url), 'utf8'))
      expect(rows[0]).toEqual({ n: journal.entries.length, hashes: journal.entries.length })
    }
    finally {
      await adminQuery(`DROP DATABASE IF EXISTS "${together}" WITH (FORCE)`)
    }
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

  it('carries invoices and their audit history over to the states in our own words', async () => {
    const before = `${name}_invoice_states`
    const folder = mkdtempSync(join(tmpdir(), 'rillbook-migrations-'))
    try {
      // A database at the migration before the new names (0014), with invoices in every old state.
      cpSync(new URL('../../drizzle', import.meta.url), folder, { recursive: true })
      const journal = JSON.parse(readFileSync(join(folder, 'meta/_journal.json'), 'utf8'))
      journal.entries = journal.entries.filter((e: { tag: string }) => e.tag <= '0014_technician-days')
      writeFileSync(join(folder, 'meta/_journal.json'), JSON.stringify(journal))
      await adminQuery(`CREATE DATABASE "${before}"`)
      const pool = new pg.Pool({ connectionString: urlFor(before), max: 1 })
      await migrate(drizzle(pool), { migrationsFolder: folder })
      const c = await pool.connect()
      try {
        // A real company and customer (later migrations keep totals per company), then invoices in every old state.
        const { rows: [co] } = await c.query(`insert into companies (name) values ('Migration Pond Care') returning id`)
        const { rows: [cu] } = await c.query(`insert into customers (company_id, name) values ($1, 'Migration Customer') returning id`, [co.id])
        const old = ['draft', 'open', 'paid', 'void', 'uncollectible']
        for (const [i, status] of old.entries()) {
          await c.query(`insert into invoices (company_id, customer_id, source, currency, tax_rate_bp, status, number, voided_at, uncollectible_at)
            values ($5, $6, 'manual', 'USD', 725, $1, $2, $3, $4)`,
          [status, status === 'draft' ? null : `2026-00${i}`, status === 'void' ? '2026-05-01T10:00:00Z' : null, status === 'uncollectible' ? '2026-06-01T10:00:00Z' : null, co.id, cu.id])
        }
        // Only the audit log matters here: skip its foreign keys for these inserts.
        await c.query('SET session_replication_role = replica')
        for (const action of ['invoice.finalize', 'invoice.send', 'invoice.void', 'invoice.mark_uncollectible', 'invoice.record_payment', 'invoice.created']) {
          await c.query(`insert into audit_log (action, subject_type, subject_id) values ($1, 'invoice', 'x')`, [action])
        }
        await c.query(`insert into audit_log (action, subject_type, subject_id, detail) values ('invoice.paid_while_closed', 'invoice', 'y', '{"status":"void","eventId":"evt_1"}')`)
        await c.query('SET session_replication_role = DEFAULT')
      }
      finally {
        c.release()
        await pool.end()
      }

      await runMigrations(urlFor(before))
      const d = new pg.Client({ connectionString: urlFor(before) })
      await d.connect()
      try {
        const { rows } = await d.query(`select number, status::text, cancelled_at, written_off_at from invoices order by number nulls first`)
        expect(rows.map(r => r.status)).toEqual(['preparing', 'due', 'paid', 'cancelled', 'written_off'])
        expect(rows[3].cancelled_at?.toISOString()).toBe('2026-05-01T10:00:00.000Z')
        expect(rows[4].written_off_at?.toISOString()).toBe('2026-06-01T10:00:00.000Z')
        const values = await d.query(`select unnest(enum_range(null::invoice_status))::text as v`)
        expect(values.rows.map(r => r.v)).toEqual(['preparing', 'due', 'paid', 'cancelled', 'written_off'])
        const audit = await d.query(`select action, detail from audit_log order by id`)
        expect(audit.rows.map(r => r.action)).toEqual(['invoice.issued', 'invoice.sent', 'invoice.cancelled', 'invoice.written_off', 'invoice.payment_recorded', 'invoice.created', 'invoice.paid_while_closed'])
        expect(audit.rows[6].detail).toEqual({ status: 'cancelled', eventId: 'evt_1' })
        // The revenue totals (a later migration) are back-filled from these invoices, in the new words.
        const totals = await d.query(`select status::text, sum(invoices)::int as n from invoice_day_totals group by 1 order by 1`)
        expect(totals.rows).toEqual([{ status: 'cancelled', n: 1 }, { status: 'due', n: 1 }, { status: 'paid', n: 1 }, { status: 'preparing', n: 1 }, { status: 'written_off', n: 1 }])
        // A new invoice starts out being prepared.
        const def = await d.query(`select column_default from information_schema.columns where table_name = 'invoices' and column_name = 'status'`)
        expect(def.rows[0].column_default).toContain('preparing')
      }
      finally {
        await d.end()
      }
    }
    finally {
      rmSync(folder, { recursive: true, force: true })
      await adminQuery(`DROP DATABASE IF EXISTS "${before}" WITH (FORCE)`)
    }
  })
})
