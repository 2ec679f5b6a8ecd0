import { sql } from 'drizzle-orm'
import type { NodePgDatabase } from 'drizzle-orm/node-postgres'

/**
 * Claims one firing of a schedule for this process, across every worker and instance: at each
 * firing all of them call this at about the same moment and exactly one gets `true`. The firing
 * is the `periodMs`-long slot `now` falls in (a schedule that fires at the start of its period
 * therefore maps every worker's firing to the same slot, even with a few seconds of clock skew).
 * The last claimed slot is kept in task_watermarks under `schedule:<name>`; any other slot can
 * be claimed, so a clock set back (or a test under a fake date) does not stop the schedule.
 */
export async function claimScheduleSlot(db: Pick<NodePgDatabase, 'execute'>, name: string, periodMs: number, now = new Date()): Promise<boolean> {
  const slot = Math.floor(now.getTime() / periodMs)
  const { rows } = await db.execute(sql`
    insert into task_watermarks (name, last_seq, last_run_at) values (${`schedule:${name}`}, ${slot}, ${now})
    on conflict (name) do update set last_seq = excluded.last_seq, last_run_at = excluded.last_run_at
      where task_watermarks.last_seq <> excluded.last_seq
    returning name`)
  return rows.length === 1
}
