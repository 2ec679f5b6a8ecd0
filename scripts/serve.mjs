// Runs the built server (.output/server/index.mjs) as N worker processes that share one port
// (node:cluster hands each accepted connection to a worker). A worker that dies is started again;
// stop() ends them all. Everything shared lives in PostgreSQL and the uploads store, so workers
// (and whole instances on other machines) are interchangeable.
import cluster from 'node:cluster'
import { availableParallelism } from 'node:os'

/** RILLBOOK_WORKERS when set (a whole number ≥ 1), else one worker per core. */
export function workerCount(value = process.env.RILLBOOK_WORKERS) {
  if (value === undefined || value === '') return availableParallelism()
  const n = Number(value)
  if (!Number.isInteger(n) || n < 1) throw new Error(`RILLBOOK_WORKERS must be a whole number of at least 1 (got "${value}")`)
  return n
}

/** A worker that dies this soon after starting is restarted after a pause, not at once. */
const QUICK_DEATH_MS = 5_000
const RESTART_PAUSE_MS = 1_000
/** How long stop() waits for a worker before ending it hard. */
const STOP_GRACE_MS = 10_000

/**
 * Forks `workers` copies of `entry` with `env` (NITRO_HOST/NITRO_PORT name the shared port).
 * Returns { stop, stopped }: stop(signal) ends every worker; stopped resolves when all are gone.
 */
export function serveWorkers({ entry, env, workers, log = () => {} }) {
  if (!cluster.isPrimary) throw new Error('serveWorkers() runs in the primary process only')
  cluster.setupPrimary({ exec: entry, args: [], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] })
  let stopping = false
  /** Live workers by id → when each started. */
  const startedAt = new Map()
  const fork = () => {
    const w = cluster.fork(env)
    startedAt.set(w.id, Date.now())
  }
  let resolveStopped
  const stopped = new Promise((r) => { resolveStopped = r })
  cluster.on('exit', (worker, code, signal) => {
    const lived = Date.now() - (startedAt.get(worker.id) ?? 0)
    startedAt.delete(worker.id)
    if (stopping) {
      if (startedAt.size === 0) resolveStopped()
      return
    }
    log(`worker ${worker.process.pid} ended (${signal ?? `exit code ${code}`}); starting another`)
    setTimeout(() => { if (!stopping) fork() }, lived < QUICK_DEATH_MS ? RESTART_PAUSE_MS : 0)
  })
  for (let i = 0; i < workers; i++) fork()
  return {
    stopped,
    stop(signal = 'SIGTERM') {
      if (stopping) return stopped
      stopping = true
      const alive = Object.values(cluster.workers ?? {}).filter(w => w && startedAt.has(w.id))
      if (alive.length === 0) resolveStopped()
      for (const w of alive) w.process.kill(signal)
      // A worker that does not finish its requests in time is ended hard.
      const hard = setTimeout(() => { for (const w of alive) if (startedAt.has(w.id)) w.process.kill('SIGKILL') }, STOP_GRACE_MS)
      hard.unref()
      return stopped
    },
  }
}
