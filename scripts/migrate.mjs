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

/** Any fixed key: every copy of this script that migrates the same database takes the same lock. */
const MIGRATION_LOCK = 7_341_002

/**
 * Applies what is missing. Several instances deploying at once wait for each other on a session
 * advisory lock, so the second finds the database up to date instead of applying it twice.
 */
export async function runMigrations(url = defaultDatabaseUrl()) {
  const client = new pg.Client({ connectionString: url })
  await client.connect()
  try {
    await client.query('select pg_advisory_lock($1)', [MIGRATION_LOCK])
    await migrate(drizzle(client), { migrationsFolder: resolve(root, 'drizzle') })
  }
  finally {
    // Ending the session releases the lock, also when a migration failed.
    await client.end()
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  runMigrations().then(
    () => console.error('[migrate] database is up to date'),
    (err) => { console.error(`[migrate] ${err.message}`); process.exitCode = 1 },
  )
}
