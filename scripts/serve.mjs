// Runs the built server (.output/server/index.mjs) as N worker processes that share one port
// (node:cluster hands each accepted connection to a worker). A worker that dies is started again;
// stop() ends them all. Everything shared lives in PostgreSQL and the uploads store, so workers
// (and whole instances on other machines) are interchangeable.
//   node scripts/serve.mjs    the workers alone, with the environment as it is (one instance of a
//                             deployment: no migrations, no seed, no local fakes; see README)
import cluster from 'node:cluster'
import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'

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
/** This many quick deaths in a row (a bad setting, a broken build): stop instead of looping. */
const QUICK_DEATHS_TO_GIVE_UP = 5
/** How long stop() waits for a worker before ending it hard. */
const STOP_GRACE_MS = 10_000

/**
 * Forks `workers` copies of `entry` with `env` (NITRO_HOST/NITRO_PORT name the shared port).
 * Returns { stop, stopped }: stop(signal) ends every worker; stopped resolves when all are gone,
 * with { failed: true } when the workers kept ending at start and were given up.
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
  let failed = false
  let quickDeaths = 0
  let resolveStopped
  const stopped = new Promise((r) => { resolveStopped = () => r({ failed }) })
  cluster.on('exit', (worker, code, signal) => {
    const lived = Date.now() - (startedAt.get(worker.id) ?? 0)
    startedAt.delete(worker.id)
    if (stopping) {
      if (startedAt.size === 0) resolveStopped()
      return
    }
    quickDeaths = lived < QUICK_DEATH_MS ? quickDeaths + 1 : 0
    if (quickDeaths >= QUICK_DEATHS_TO_GIVE_UP) {
      log(`workers keep ending as they start (${signal ?? `exit code ${code}`}); stopping — see the messages above`)
      failed = true
      api.stop()
      return
    }
    log(`worker ${worker.process.pid} ended (${signal ?? `exit code ${code}`}); starting another`)
    setTimeout(() => { if (!stopping) fork() }, quickDeaths ? RESTART_PAUSE_MS : 0)
  })
  for (let i = 0; i < workers; i++) fork()
  const api = {
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
  return api
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const say = msg => process.stderr.write(`[serve] ${msg}\n`)
  const entry = resolve(dirname(fileURLToPath(import.meta.url)), '../.output/server/index.mjs')
  try {
    if (!existsSync(entry)) throw new Error('no build in .output: run npm run build first')
    const workers = workerCount()
    const host = process.env.NITRO_HOST || process.env.HOST || '127.0.0.1'
    const port = process.env.NITRO_PORT || process.env.PORT || '3000'
    const served = serveWorkers({ entry, env: { ...process.env, NITRO_HOST: host, NITRO_PORT: port }, workers, log: say })
    say(`${workers} worker${workers === 1 ? '' : 's'} on ${host}:${port}`)
    for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => served.stop('SIGTERM'))
    served.stopped.then(({ failed }) => process.exit(failed ? 1 : 0))
  }
  catch (err) {
    say(err.message)
    process.exitCode = 1
  }
}
