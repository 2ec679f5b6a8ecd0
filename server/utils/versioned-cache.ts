import { and, eq, sql } from 'drizzle-orm'
import { changeCounters, type ChangeTopic } from '../db/schema'
import { preparedQuery } from './db'

/**
 * Exact answers kept per process under the change counters their inputs raise
 * (server/db/schema/change-counters.ts). An entry is used only while every counter it was
 * computed under still has the same value and the caller's other inputs (the company's date, the
 * query) are the same: whatever changes an input raises a counter in the same transaction, so on
 * every instance the next request after that commit computes afresh. Never approximate, never
 * stale.
 *
 * - Read the counters first (`counterOf`, in the query that checks access), then compute: a
 *   change that commits in between raises the counter again, so an answer stored under the older value is at worst computed
 *   from newer rows and is replaced by the next request.
 * - Concurrent requests for the same key and version share one computation (single flight); a
 *   computation that fails is not kept.
 * - Bounded in entries (and optionally in weight), the least recently used dropped first.
 *
 * RILLBOOK_ANSWER_CACHE=0 turns every such cache off (each request computes).
 */
export interface VersionedCache<T> {
  /** The answer for `key` computed under `version`: the kept one, one under way, or a new computation. */
  get: (key: string, version: string, compute: () => Promise<T>) => Promise<T>
  clear: () => void
  readonly size: number
}

interface Entry<T> { version: string, value: Promise<T>, weight: number }

const enabled = () => process.env.RILLBOOK_ANSWER_CACHE !== '0'

/**
 * At most `max` entries and, with `weigh`, at most `maxWeight` in all (e.g. points of a series),
 * so a few large answers cannot hold the process's memory; an answer heavier than that alone
 * is answered but not kept.
 */
export function versionedCache<T>(max: number, opts: { weigh?: (value: T) => number, maxWeight?: number } = {}): VersionedCache<T> {
  const entries = new Map<string, Entry<T>>()
  let weight = 0
  const drop = (key: string) => {
    const e = entries.get(key)
    if (!e) return
    weight -= e.weight
    entries.delete(key)
  }
  const trim = () => {
    while (entries.size > max || (opts.maxWeight !== undefined && weight > opts.maxWeight && entries.size > 0)) drop(entries.keys().next().value!)
  }
  return {
    get(key, version, compute) {
      if (!enabled()) return compute()
      const hit = entries.get(key)
      if (hit && hit.version === version) {
        // Most recently used last: Map keeps insertion order.
        entries.delete(key)
        entries.set(key, hit)
        return hit.value
      }
      const entry: Entry<T> = { version, value: compute(), weight: 0 }
      entry.value.then((value) => {
        if (entries.get(key) !== entry || !opts.weigh) return
        entry.weight = opts.weigh(value)
        weight += entry.weight
        trim()
      }, () => {
        if (entries.get(key) === entry) drop(key)
      })
      drop(key)
      entries.set(key, entry)
      trim()
      return entry.value
    },
    clear: () => {
      entries.clear()
      weight = 0
    },
    get size() {
      return entries.size
    },
  }
}

/**
 * A counter's value as a SQL expression (0 when never raised) whose subject is the column
 * `table.column` of the outer query, so one indexed query can check access and read the
 * counter. The outer column is named in full: Drizzle leaves columns unqualified in a
 * one-table select.
 */
export function counterOf(topic: ChangeTopic, table: string, column: string) {
  return sql<string>`coalesce((select cc.version from change_counters cc where cc.topic = ${topic} and cc.subject_id = ${sql.identifier(table)}.${sql.identifier(column)}), 0)::text`
}

const companyCounters = preparedQuery(db => db.select({ topic: changeCounters.topic, version: changeCounters.version }).from(changeCounters)
  .where(and(eq(changeCounters.subjectId, sql.placeholder('companyId')), sql`${changeCounters.topic} = any(${sql.placeholder('topics')}::text[])`))
  .prepare('company_counters'))

/**
 * A company's answer kept under the counters of `topics` (one indexed read of them first, then
 * the kept answer or a new computation). `key` must hold every other input of the answer: the
 * caller's reach, the query, the company's date. With RILLBOOK_ANSWER_CACHE=0 it computes without
 * reading the counters.
 */
export async function keptForCompany<T>(cache: VersionedCache<T>, companyId: string, topics: readonly ChangeTopic[], key: string, compute: () => Promise<T>): Promise<T> {
  if (!enabled()) return compute()
  const rows = await companyCounters().execute({ companyId, topics: [...topics] })
  const of = new Map(rows.map(r => [r.topic, r.version]))
  return cache.get(`${companyId}|${key}`, topics.map(t => of.get(t) ?? 0).join('.'), compute)
}
