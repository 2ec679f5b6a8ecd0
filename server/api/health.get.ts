import { sql } from 'drizzle-orm'

// Public: liveness and database reachability, for the start script and load balancers.
export default defineEventHandler(async () => {
  await useDb().execute(sql`select 1`)
  return { ok: true }
})
