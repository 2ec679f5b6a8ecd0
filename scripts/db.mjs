#!/usr/bin/env node
// PostgreSQL lifecycle for Rillbook: a project-local cluster under .data/, listening on 127.0.0.1 only.
// Usage: node scripts/db.mjs install|start|stop|status   (install: only make sure the server binaries exist)
// When DATABASE_URL is set, nothing here runs: the app uses that server as it is.
import { execFileSync, spawnSync } from 'node:child_process'
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync, chmodSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import pg from 'pg'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')

/** Settings of one local cluster. `name` picks the folder under .data/ (e.g. "pg", "pg-test"). */
export function clusterConfig({ name = 'pg', port, database, fast = false } = {}) {
  const dataDir = resolve(root, '.data', name)
  return {
    dataDir,
    port: Number(port ?? process.env.RILLBOOK_PG_PORT ?? 54329),
    database: database ?? process.env.RILLBOOK_PG_DATABASE ?? 'rillbook',
    fast,
  }
}

export function urlFor(cfg, database = cfg.database) {
  return `postgres://postgres@127.0.0.1:${cfg.port}/${database}`
}

function log(msg) {
  process.stderr.write(`[db] ${msg}\n`)
}

const isRoot = typeof process.getuid === 'function' && process.getuid() === 0

/** Newest Debian server install with an executable initdb, or null. */
function findBinDir() {
  const base = '/usr/lib/postgresql'
  if (!existsSync(base)) return null
  const majors = readdirSync(base)
    .filter(v => existsSync(join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a))
  return majors.length ? join(base, majors[0], 'bin') : null
}

function ensureBinaries() {
  let bin = findBinDir()
  if (bin) return bin
  if (!isRoot) {
    throw new Error(
      'PostgreSQL server binaries were not found under /usr/lib/postgresql/*/bin.\n'
      + 'Install them with:  sudo apt-get install -y --no-install-recommends postgresql\n'
      + 'or set DATABASE_URL to a PostgreSQL server you already run.',
    )
  }
  log('PostgreSQL is not installed; installing Debian\'s postgresql package (apt-get)…')
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env })
  execFileSync('apt-get', ['install', '-y', '-qq', '--no-install-recommends', 'postgresql'], { stdio: 'inherit', env })
  bin = findBinDir()
  if (!bin) throw new Error('apt-get finished but no initdb was found under /usr/lib/postgresql/*/bin')
  return bin
}

/** initdb and pg_ctl refuse to run as root: as root, run them as the `postgres` OS user. */
function ensurePostgresUser() {
  const r = spawnSync('id', ['-u', 'postgres'])
  if (r.status === 0) return
  log('creating the postgres system user')
  execFileSync('useradd', ['--system', '--no-create-home', '--shell', '/usr/sbin/nologin', 'postgres'], { stdio: 'inherit' })
}

/** postgres must be able to walk down to the data folder. */
function ensureTraversable(dir) {
  let d = dirname(dir)
  while (d !== '/') {
    const mode = statSync(d).mode
    if ((mode & 0o001) === 0) {
      log(`making ${d} traversable (o+x) so the postgres user can reach .data/`)
      chmodSync(d, mode | 0o001)
    }
    d = dirname(d)
  }
}

function run(bin, tool, args, opts = {}) {
  const exe = join(bin, tool)
  const [cmd, argv] = isRoot ? ['runuser', ['-u', 'postgres', '--', exe, ...args]] : [exe, args]
  return spawnSync(cmd, argv, { encoding: 'utf8', ...opts })
}

/** The postmaster pid from postmaster.pid when that process is alive (a zombie counts as dead). */
function livePostmasterPid(cfg) {
  const pidFile = join(cfg.dataDir, 'postmaster.pid')
  if (!existsSync(pidFile)) return null
  const pid = Number(readFileSync(pidFile, 'utf8').split('\n')[0])
  if (!pid) return null
  try {
    const state = readFileSync(`/proc/${pid}/status`, 'utf8').match(/^State:\s+(\w)/m)?.[1]
    return state && state !== 'Z' ? pid : null
  }
  catch {
    return null
  }
}

function isRunning(bin, cfg) {
  if (!existsSync(join(cfg.dataDir, 'PG_VERSION'))) return false
  const r = run(bin, 'pg_ctl', ['-D', cfg.dataDir, 'status'])
  return r.status === 0 && livePostmasterPid(cfg) !== null
}

export async function start(cfg = clusterConfig()) {
  const bin = ensureBinaries()
  mkdirSync(cfg.dataDir, { recursive: true })
  if (isRoot) {
    ensurePostgresUser()
    ensureTraversable(cfg.dataDir)
    execFileSync('chown', ['-R', 'postgres:postgres', cfg.dataDir])
  }
  chmodSync(cfg.dataDir, 0o700)
  if (!existsSync(join(cfg.dataDir, 'PG_VERSION'))) {
    log(`creating a new cluster in ${cfg.dataDir}`)
    const r = run(bin, 'initdb', ['-D', cfg.dataDir, '--auth=trust', '-U', 'postgres', '--encoding=UTF8', '--locale=C.UTF-8'])
    if (r.status !== 0) throw new Error(`initdb failed:\n${r.stdout}\n${r.stderr}`)
  }
  if (isRunning(bin, cfg)) {
    log(`already running on 127.0.0.1:${cfg.port}`)
  }
  else {
    const pidFile = join(cfg.dataDir, 'postmaster.pid')
    if (existsSync(pidFile)) {
      log('removing a stale postmaster.pid (no server is running)')
      rmSync(pidFile)
    }
    // random_page_cost 1.1: the data sits on SSD or in memory, where an index lookup costs about
    // what a sequential read does (PostgreSQL's default of 4 is for spinning disks). With 4 a
    // technician's week joins every customer and site by hash instead of fetching its ~200 visits'.
    const opts = [`-c listen_addresses=127.0.0.1`, `-p ${cfg.port}`, `-k ${cfg.dataDir}`, '-c random_page_cost=1.1']
    if (cfg.fast) opts.push('-c fsync=off', '-c synchronous_commit=off', '-c full_page_writes=off')
    const r = run(bin, 'pg_ctl', ['-D', cfg.dataDir, '-l', join(cfg.dataDir, 'server.log'), '-w', '-t', '30', '-o', opts.join(' '), 'start'])
    if (r.status !== 0) {
      const tail = existsSync(join(cfg.dataDir, 'server.log')) ? readFileSync(join(cfg.dataDir, 'server.log'), 'utf8').split('\n').slice(-15).join('\n') : ''
      throw new Error(`pg_ctl start failed (port ${cfg.port} in use?):\n${r.stdout}\n${r.stderr}\n${tail}`)
    }
    log(`started on 127.0.0.1:${cfg.port}`)
  }
  await ensureDatabase(cfg, cfg.database)
  return urlFor(cfg)
}

export async function ensureDatabase(cfg, database, { fresh = false } = {}) {
  const client = new pg.Client({ connectionString: urlFor(cfg, 'postgres') })
  await client.connect()
  try {
    if (fresh) await client.query(`DROP DATABASE IF EXISTS "${database}" WITH (FORCE)`)
    const { rowCount } = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [database])
    if (!rowCount) {
      await client.query(`CREATE DATABASE "${database}"`)
      log(`created database ${database}`)
    }
  }
  finally {
    await client.end()
  }
}

export function stop(cfg = clusterConfig()) {
  const bin = findBinDir()
  if (!bin || !isRunning(bin, cfg)) {
    log('not running')
    return
  }
  const r = run(bin, 'pg_ctl', ['-D', cfg.dataDir, '-m', 'fast', '-w', 'stop'])
  if (r.status !== 0) throw new Error(`pg_ctl stop failed:\n${r.stdout}\n${r.stderr}`)
  log('stopped')
}

export function status(cfg = clusterConfig()) {
  const bin = findBinDir()
  const running = !!bin && isRunning(bin, cfg)
  return { running, port: cfg.port, dataDir: cfg.dataDir, url: urlFor(cfg), binaries: bin }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const cmd = process.argv[2]
  try {
    if (process.env.DATABASE_URL && cmd !== 'status') {
      log('DATABASE_URL is set: using that server; nothing to start or stop here')
    }
    else if (cmd === 'install') {
      console.log(ensureBinaries())
    }
    else if (cmd === 'start') {
      console.log(await start())
    }
    else if (cmd === 'stop') {
      stop()
    }
    else if (cmd === 'status') {
      if (process.env.DATABASE_URL) {
        console.log('DATABASE_URL is set: the app uses that server')
      }
      else {
        const s = status()
        console.log(s.running ? `running on 127.0.0.1:${s.port} (${s.dataDir})` : `stopped (${s.dataDir})`)
        process.exitCode = s.running ? 0 : 3
      }
    }
    else {
      console.error('usage: node scripts/db.mjs install|start|stop|status')
      process.exitCode = 2
    }
  }
  catch (err) {
    console.error(`[db] ${err.message}`)
    process.exitCode = 1
  }
}

/** The path of a PostgreSQL client program (pg_dump, pg_restore) of the newest server install, or its bare name from PATH. */
export function pgTool(name) {
  const bin = findBinDir()
  return bin && existsSync(join(bin, name)) ? join(bin, name) : name
}
