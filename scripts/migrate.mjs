#!/usr/bin/env node
// Applies the committed drizzle-kit migrations in drizzle/ to DATABASE_URL (or the local server).
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { drizzle } from 'drizzle-orm/node-postgres'
import { migrate } from 'drizzle-orm/node-postgres/migrator'
import pg from 'pg'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')

export function defaultDatabaseUrl() {
  return process.env.DATABASE_URL
    || `postgres://postgres@127.0.0.1:${process.env.RILLBOOK_PG_PORT || 54329}/${process.env.RILLBOOK_PG_DATABASE || 'rillbook'}`
}

export async function runMigrations(url = defaultDatabaseUrl()) {
  const pool = new pg.Pool({ connectionString: url, max: 1 })
  try {
    await migrate(drizzle(pool), { migrationsFolder: resolve(root, 'drizzle') })
  }
  finally {
    await pool.end()
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  runMigrations().then(
    () => console.error('[migrate] database is up to date'),
    (err) => { console.error(`[migrate] ${err.message}`); process.exitCode = 1 },
  )
}
