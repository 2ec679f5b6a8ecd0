import { afterAll, describe, expect, it, inject } from 'vitest'
import pg from 'pg'
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
})
