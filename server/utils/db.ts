import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import * as schema from '../db/schema'

export type Database = NodePgDatabase<typeof schema>
/** A transaction handle, accepted wherever a service writes inside someone else's transaction. */
export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

let pool: pg.Pool | undefined
let instance: Database | undefined

/** The connection string: DATABASE_URL, else the project-local server started by scripts/db.mjs. */
export function databaseUrl(): string {
  return process.env.DATABASE_URL
    || process.env.NUXT_DATABASE_URL
    || `postgres://postgres@127.0.0.1:${process.env.RILLBOOK_PG_PORT || 54329}/${process.env.RILLBOOK_PG_DATABASE || 'rillbook'}`
}

/** The one pooled Drizzle instance. Nothing else in the app opens database connections. */
export function useDb(): Database {
  if (!instance) {
    pool = new pg.Pool({
      connectionString: databaseUrl(),
      max: Number(process.env.RILLBOOK_PG_POOL_MAX || 10),
      // During a database outage requests fail fast (503) instead of queueing for ever.
      connectionTimeoutMillis: Number(process.env.RILLBOOK_PG_CONNECT_TIMEOUT_MS || 5000),
    })
    // An idle connection dropped by a restarting server must not take the process down; the pool
    // opens a new one on the next query.
    pool.on('error', (err) => { console.error(`[db] idle connection lost: ${err.message}`) })
    instance = drizzle(pool, { schema, logger: process.env.RILLBOOK_LOG_SQL === '1' ? sqlLineLogger : false })
  }
  return instance
}

export { schema }

/**
 * A query built once per database instance and run as a named prepared statement: Drizzle does
 * not build its SQL again, and PostgreSQL parses and plans it once per connection. For the reads
 * asked most (a technician's day, a feature); values go in as `sql.placeholder(name)`.
 *   const dayVisits = preparedQuery(db => db.select(…).where(eq(visits.id, sql.placeholder('id'))).prepare('day_visits'))
 *   await dayVisits().execute({ id })
 */
export function preparedQuery<T>(build: (db: Database) => T): () => T {
  const built = new WeakMap<Database, T>()
  return () => {
    const db = useDb()
    let q = built.get(db)
    if (!q) built.set(db, (q = build(db)))
    return q
  }
}

/**
 * RILLBOOK_LOG_SQL=1 (diagnostics; the bench uses it to replay an endpoint's exact statements
 * straight through pg): every statement and its parameters as one JSON line on stderr.
 */
const sqlLineLogger = {
  logQuery(query: string, params: unknown[]) {
    process.stderr.write(`[sql] ${JSON.stringify({ sql: query, params })}\n`)
  },
}

/** Closes the pool (scripts and tests; the server keeps it for its lifetime). */
export async function closeDb() {
  await pool?.end()
  pool = undefined
  instance = undefined
}

/**
 * Runs `fn` while holding a PostgreSQL session advisory lock named `name` on a connection of its
 * own, so a job that spans many transactions runs once across every app instance. Returns
 * `{ skipped: true }` when another holder has it. A crashed holder's connection closes and the
 * lock goes with it.
 */
export async function withSessionLock<T>(name: string, fn: () => Promise<T>): Promise<{ skipped: true } | { skipped: false, value: T }> {
  useDb()
  const client = await pool!.connect()
  try {
    const { rows: [row] } = await client.query<{ ok: boolean }>('select pg_try_advisory_lock(hashtext($1)) as ok', [name])
    if (!row?.ok) return { skipped: true }
    try {
      return { skipped: false, value: await fn() }
    }
    finally {
      await client.query('select pg_advisory_unlock(hashtext($1))', [name]).catch(() => {})
    }
  }
  finally {
    client.release()
  }
}

const DOWN_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', '57P01', '57P02', '57P03', '08000', '08001', '08003', '08004', '08006'])

/**
 * True when PostgreSQL gave up a transaction because it met another at the same moment (a
 * deadlock, e.g. on change counters raised in another order, or a serialization failure): the
 * transaction was rolled back whole, so the same request may simply be sent again.
 */
export function isWriteConflict(err: unknown): boolean {
  return hasErrorCode(err, '40P01', '40001')
}

/** True when a waited-for lock was not granted within the transaction's `lock_timeout`. */
export function isLockTimeout(err: unknown): boolean {
  return hasErrorCode(err, '55P03')
}

/** True when `err` or an error it wraps (Drizzle wraps the driver's) carries one of these SQLSTATEs. */
function hasErrorCode(err: unknown, ...codes: string[]): boolean {
  for (let e = err as { code?: string, cause?: unknown } | undefined, depth = 0; e && depth < 6; e = e.cause as typeof e, depth++) {
    if (e.code && codes.includes(e.code)) return true
  }
  return false
}

/** True when `err` (or its cause) says the database cannot be reached, rather than a bad query. */
export function isDatabaseDown(err: unknown): boolean {
  for (let e = err as { code?: string, message?: string, cause?: unknown } | undefined, depth = 0; e && depth < 6; e = e.cause as typeof e, depth++) {
    if (e.code && DOWN_CODES.has(e.code)) return true
    if (typeof e.message === 'string' && /Connection terminated|timeout exceeded when trying to connect|the database system is (starting up|shutting down)/i.test(e.message)) return true
  }
  return false
}
