// npm run bench [-- --customers 5000 --duration 5 --reseed]
// Benchmarks on the large invented company (db:seed:scale): the built server on loopback under
// autocannon at 1 and 50 connections for sign-in, the technician's Today, a feature's year of
// readings, the invoices table, the revenue view and the water evaluation, each beside the same
// query run straight through pg; the alert scan (incremental and full), renewing contracts, the
// JavaScript each page loads, and that every list is paginated; and the season planner on the
// company's own season (bench/season.ts; --only planner runs just that, without the server;
// --only planner-synthetic the older generated season of bench/planner.ts). Writes
// bench/results/<time>.json and bench/results/summary.md, and names each budget met or missed.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { parseArgs } from 'node:util'
import { availableParallelism } from 'node:os'
import { gzipSync } from 'node:zlib'
import autocannon from 'autocannon'
import pg from 'pg'
import { chromium } from 'playwright-core'
// @ts-expect-error plain ESM script without types
import { clusterConfig, urlFor } from './db.mjs'
import { runPlannerBench } from '../bench/planner'
import { runSeasonBench } from '../bench/season'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')
const { values } = parseArgs({ options: { 'customers': { type: 'string', default: '5000' }, 'duration': { type: 'string', default: '5' }, 'reseed': { type: 'boolean', default: false }, 'port': { type: 'string', default: '3299' }, 'summary-only': { type: 'boolean', default: false }, 'only': { type: 'string' } } })
/** --only pages (or endpoints, alerts, renewals, pagination, planner, planner-synthetic): measure just that part and merge it into latest.json. */
const want = (part: string) => !values.only || values.only.split(',').includes(part)
const DURATION = Number(values.duration)
const PORT = Number(values.port)
const BASE = `http://127.0.0.1:${PORT}`
const DB_URL = process.env.BENCH_DATABASE_URL || urlFor(clusterConfig({ database: 'rillbook_scale' }), 'rillbook_scale')
const say = (m: string) => process.stderr.write(`[bench] ${m}\n`)

const BUDGET = { p95Ms: 100, throughputRatio: 0.4, alertIncrementalS: 1, alertFullS: 60, renew10kS: 60, visitPageJsKb: 200 }

function bin(name: string) {
  return resolve(root, 'node_modules/.bin', name)
}

async function ensureData(pgc: pg.Client) {
  const has = await pgc.query(`select count(*)::int as n from information_schema.tables where table_name = 'readings'`).then(r => r.rows[0].n > 0).catch(() => false)
  const readings = has ? (await pgc.query('select count(*)::int as n from readings')).rows[0].n : 0
  return readings
}

/** True when the large company has windowed plan templates and technicians with homes (what the season bench plans with). */
async function hasSeasonBook(pgc: pg.Client) {
  const { rows: [r] } = await pgc.query(`select (select count(*) from plan_visit_templates where season_from <> '01-01' or season_to <> '12-31')::int as windows,
    (select count(*) from staff_profiles where home_latitude is not null)::int as homes`)
  return r.windows > 0 && r.homes > 0
}

/** Workers of the measured server: RILLBOOK_WORKERS as `npm start` reads it, else one per core (scripts/serve.mjs). */
const WORKERS = Number(process.env.RILLBOOK_WORKERS || availableParallelism())

/**
 * The built server the way `npm start` runs it: scripts/serve.mjs with `workers` processes on one
 * port. With `logSql` each statement the app sends comes out on stderr as a JSON line
 * (RILLBOOK_LOG_SQL, server/utils/db.ts) and is handed to `onSql`.
 */
async function startServer(opts: { port: number, workers: number, logSql?: (line: { sql: string, params: unknown[] }) => void, env?: Record<string, string> }): Promise<ChildProcess> {
  if (!existsSync(resolve(root, '.output/server/index.mjs'))) {
    say('building…')
    spawnSync(bin('nuxt'), ['build'], { cwd: root, stdio: 'inherit' })
  }
  const server = spawn(process.execPath, [resolve(root, 'scripts/serve.mjs')], {
    cwd: root, stdio: ['ignore', 'ignore', opts.logSql ? 'pipe' : 'inherit'],
    env: { ...process.env, DATABASE_URL: DB_URL, NITRO_HOST: '127.0.0.1', NITRO_PORT: String(opts.port), RILLBOOK_WORKERS: String(opts.workers), RILLBOOK_PG_POOL_MAX: String(Math.max(5, Math.ceil(20 / opts.workers))), STRIPE_SECRET_KEY: '', SMTP_HOST: '127.0.0.1', SMTP_PORT: '2599', ...(opts.logSql && { RILLBOOK_LOG_SQL: '1' }), ...opts.env },
  })
  if (opts.logSql) {
    let rest = ''
    server.stderr!.setEncoding('utf8').on('data', (chunk: string) => {
      const lines = (rest + chunk).split('\n')
      rest = lines.pop() ?? ''
      for (const l of lines) if (l.startsWith('[sql] ')) opts.logSql!(JSON.parse(l.slice(6)))
    })
  }
  for (let i = 0; i < 150; i++) {
    try {
      if ((await fetch(`http://127.0.0.1:${opts.port}/api/health`)).ok) return server
    }
    catch {}
    await new Promise(r => setTimeout(r, 200))
  }
  throw new Error('the server did not start')
}

async function stopServer(server: ChildProcess) {
  const gone = new Promise(r => server.once('exit', r))
  server.kill('SIGTERM')
  await gone
}

type Statement = { sql: string, params: unknown[] }
interface Case { name: string, path: string, method?: string, body?: unknown, token?: string, read: boolean }

/**
 * "The same work straight through pg": the exact statements the app sends for one request of each
 * case (its session already known), captured from a one-worker server that logs its SQL. With
 * `answersKept: false` the server keeps no answers between requests (RILLBOOK_ANSWER_CACHE=0), so
 * these are the statements that build the answer from the database; with `true`, those a warm
 * request sends when its answer is kept. Each case is asked three times after a warm-up and the
 * smallest set is kept, so a scheduled task's statements that happen to fall inside a request are
 * left out.
 */
async function captureStatements(cases: Case[], answersKept: boolean): Promise<Map<string, Statement[]>> {
  const port = PORT + 1
  let sink: Statement[] | null = null
  const server = await startServer({ port, workers: 1, logSql: (line) => { sink?.push(line) }, env: answersKept ? {} : { RILLBOOK_ANSWER_CACHE: '0' } })
  const out = new Map<string, Statement[]>()
  try {
    for (const k of cases) {
      const ask = () => fetch(`http://127.0.0.1:${port}${k.path}`, { method: k.method ?? 'GET', headers: { 'content-type': 'application/json', ...(k.token ? { authorization: `Bearer ${k.token}` } : {}) }, body: k.body === undefined ? undefined : JSON.stringify(k.body) }).then(r => r.arrayBuffer())
      await ask()
      let best: Statement[] | null = null
      for (let i = 0; i < 3; i++) {
        sink = []
        await ask()
        await new Promise(r => setTimeout(r, 50))
        if (!best || sink.length < best.length) best = sink
        sink = null
      }
      out.set(k.name, best!)
    }
  }
  finally {
    await stopServer(server)
  }
  return out
}

interface Load { rps: number, p50: number, p95: number, p99: number, errors: number, non2xx: number }
async function load(opts: { path: string, method?: string, body?: unknown, token?: string, connections: number }): Promise<Load> {
  const r = await autocannon({
    url: `${BASE}${opts.path}`, method: (opts.method ?? 'GET') as 'GET', connections: opts.connections, duration: DURATION,
    headers: { 'content-type': 'application/json', ...(opts.token ? { authorization: `Bearer ${opts.token}` } : {}) },
    body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
  })
  return { rps: r.requests.average, p50: r.latency.p50, p95: percentile95(r), p99: r.latency.p99, errors: r.errors, non2xx: r.non2xx }
}
/** autocannon reports p90 and p97.5; p95 is interpolated between them. */
function percentile95(r: autocannon.Result) {
  return r.latency.p90 + (r.latency.p97_5 - r.latency.p90) * (5 / 7.5)
}

/**
 * The same work straight through pg: `connections` loops sharing a pool, each running the
 * statements in order (on one connection of its own when they hold a transaction). Null when
 * there is nothing to run.
 */
async function baseline(sqls: Statement[], connections: number): Promise<Load | null> {
  if (!sqls.length) return null
  const pool = new pg.Pool({ connectionString: DB_URL, max: Math.min(connections, 20) })
  const inTransaction = sqls.some(q => /^\s*(begin|start transaction)/i.test(q.sql))
  const times: number[] = []
  const end = Date.now() + DURATION * 1000
  await Promise.all(Array.from({ length: connections }, async () => {
    while (Date.now() < end) {
      const t = performance.now()
      if (inTransaction) {
        const client = await pool.connect()
        try {
          for (const q of sqls) await client.query(q.sql, q.params)
        }
        finally {
          client.release()
        }
      }
      else {
        for (const q of sqls) await pool.query(q.sql, q.params)
      }
      times.push(performance.now() - t)
    }
  }))
  await pool.end()
  times.sort((a, b) => a - b)
  const at = (p: number) => times[Math.min(times.length - 1, Math.floor(p * times.length))] ?? 0
  return { rps: times.length / DURATION, p50: at(0.5), p95: at(0.95), p99: at(0.99), errors: 0, non2xx: 0 }
}

const results0: { seedSeconds?: number } = {}

async function main() {
  if (values['summary-only']) {
    const dir = resolve(root, 'bench/results')
    writeFileSync(resolve(dir, 'summary.md'), summaryMd(JSON.parse(readFileSync(resolve(dir, 'latest.json'), 'utf8'))))
    return
  }
  // The synthetic season (pure: no database, no server), only when asked for by name.
  const plannerSynthetic = values.only?.split(',').includes('planner-synthetic') ? runPlannerBench(say) : undefined
  if (values.only && values.only.split(',').every(p => p === 'planner-synthetic')) {
    saveResults({ plannerSynthetic })
    return
  }
  // How much data is there already? (A check only: the connection closes before any reseed drops the database.)
  let readings = 0
  const probe = new pg.Client({ connectionString: DB_URL })
  probe.on('error', () => {})
  try {
    await probe.connect()
    readings = await ensureData(probe)
    // A large company seeded before its plans had windows and its technicians homes: make it again.
    if (readings && !(await hasSeasonBook(probe))) readings = 0
  }
  catch {}
  await probe.end().catch(() => {})
  if (values.reseed || readings < 1000) {
    say(`generating the large company (${values.customers} customers)…`)
    const t = Date.now()
    const r = spawnSync(bin('tsx'), ['scripts/seed-scale.ts', '--customers', values.customers!], { cwd: root, stdio: ['ignore', 'pipe', 'inherit'], encoding: 'utf8' })
    if (r.status !== 0) throw new Error('db:seed:scale failed')
    results0.seedSeconds = (Date.now() - t) / 1000
    say(`generated in ${results0.seedSeconds.toFixed(1)} s`)
  }
  const c = new pg.Client({ connectionString: DB_URL })
  await c.connect()
  const counts = (await c.query(`select (select count(*) from customers)::int as customers, (select count(*) from water_features)::int as features, (select count(*) from contracts)::int as contracts,
    (select count(*) from visits)::int as visits, (select count(*) from readings)::int as readings, (select count(*) from invoices)::int as invoices`)).rows[0]
  say(`data: ${JSON.stringify(counts)}`)
  const results: Record<string, unknown> = { at: new Date().toISOString(), counts, durationSeconds: DURATION, budgets: BUDGET, seedSeconds: results0.seedSeconds ?? null }
  const { rows: [co] } = await c.query(`select id from companies where name like 'Larchfield Pond Care%' limit 1`)
  const companyId = co.id as string
  if (want('planner')) results.planner = await runSeasonBench(c, companyId, say)
  if (plannerSynthetic) results.plannerSynthetic = plannerSynthetic
  if (values.only && values.only.split(',').every(p => ['planner', 'planner-synthetic'].includes(p))) {
    await c.end()
    saveResults(results)
    return
  }

  // The alert scan is up to date when the measured server starts (as in a company that has been
  // running): its scheduled run must not scan the whole generated history during a measurement.
  await c.query(`insert into task_watermarks (name, last_seq) values ('alerts:scan', (select coalesce(max(seq), 0) from readings)) on conflict (name) do update set last_seq = excluded.last_seq`)
  const server = await startServer({ port: PORT, workers: WORKERS })
  results.workers = WORKERS
  try {
    const login = async (email: string) => (await (await fetch(`${BASE}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: 'demo-pond-2026' }) })).json() as { token: string }).token
    const owner = await login('owner@larchfield-scale.example')
    // Today on a full day, whatever the date of the run: a technician-day of the planned current
    // season with as many stops as nine in ten of its days have at most (the 90th percentile).
    const { rows: [busy] } = await c.query(`with d as (select v.technician_id as id, v.scheduled_on as day, count(*)::int as stops from visits v
        where v.company_id = $1 and v.status <> 'cancelled' and v.technician_id is not null and v.generation_key is not null group by 1, 2),
      p as (select percentile_disc(0.9) within group (order by stops) as stops from d)
      select u.email, u.id, d.day::text as day, d.stops from d join p on d.stops = p.stops join users u on u.id = d.id order by d.day desc limit 1`, [companyId])
    const techEmail = busy.email as string
    results.todayDay = { date: busy.day, stops: busy.stops }
    const tech = await login(techEmail)
    const { rows: [feature] } = await c.query(`select feature_id as id from readings group by 1 order by count(*) desc limit 1`)
    // The board's week, whatever the date of the run: the planned season's busiest week, Monday to Sunday.
    const { rows: [week] } = await c.query(`select w::text as from, (w + 6)::text as to, n from (select date_trunc('week', scheduled_on)::date as w, count(*)::int as n
      from visits where company_id = $1 and generation_key is not null group by 1 order by 2 desc, 1 limit 1) x`, [companyId])
    results.scheduleWeek = { from: week.from, to: week.to, visits: week.n }
    const { rows: [weekTech] } = await c.query(`select technician_id as id from visits where company_id = $1 and scheduled_on between $2 and $3 and technician_id is not null
      group by 1 order by count(*) desc limit 1`, [companyId, week.from, week.to])
    // Each read's baseline is the statements the app itself sends for it (captureStatements); sign-in
    // writes a session, so its baseline is the user lookup alone.
    const cases: Array<Case & { base?: Statement[] }> = [
      { name: 'sign-in', method: 'POST', path: '/api/auth/login', body: { email: 'owner@larchfield-scale.example', password: 'demo-pond-2026' }, read: false,
        base: [{ sql: 'select id, password_hash from users where email = $1', params: ['owner@larchfield-scale.example'] }] },
      { name: "technician's Today", path: `/api/today?date=${busy.day}`, token: tech, read: true },
      { name: "a feature's year of readings", path: `/api/features/${feature.id}/series?range=year`, token: owner, read: true },
      { name: 'invoices table, first page', path: '/api/invoices?page=1&pageSize=25&sort=issueDate&dir=desc', token: owner, read: true },
      { name: 'revenue view', path: '/api/revenue', token: owner, read: true },
      { name: 'customers list, first page', path: '/api/customers?page=1&pageSize=25&sort=name&dir=asc&status=current', token: owner, read: true },
      // The owner's week as the board asks for it: at scale more visits than one answer carries, so
      // the answer is each technician-day's load and how many visits there are.
      { name: 'schedule week', path: `/api/schedule?from=${week.from}&to=${week.to}&includeCancelled=true`, token: owner, read: true },
      // One technician's week with its visit cards (the pick from that overview).
      { name: "schedule week, one technician's visits", path: `/api/schedule?from=${week.from}&to=${week.to}&includeCancelled=true&technicianId=${weekTech.id}`, token: owner, read: true },
      // A reading evaluated against its feature (volume, ranges, site altitude, fish), as the visit form does.
      { name: 'POST /api/water/evaluate', method: 'POST', path: '/api/water/evaluate', token: owner, read: true, body: { featureId: feature.id, reading: { temperatureC: 24, pH: 8.1, totalAmmoniaMgL: 0.5, khMgL: 90 } } },
    ]
    const rows: Array<Record<string, unknown>> = []
    // The budget's baseline: the statements that build each answer from the database. Where the
    // app keeps an answer between changes (server/utils/versioned-cache.ts), a warm request sends
    // fewer (the change counters); that ratio is shown beside it.
    const statements = want('endpoints') ? await captureStatements(cases.filter(k => !k.base), false) : new Map<string, Statement[]>()
    const requestStatements = want('endpoints') ? await captureStatements(cases.filter(k => !k.base), true) : new Map<string, Statement[]>()
    const sameSql = (a: Statement[], b: Statement[]) => a.length === b.length && a.every((q, i) => q.sql === b[i]!.sql)
    for (const k of want('endpoints') ? cases : []) {
      const base = k.base ?? statements.get(k.name)!
      const perRequest = k.base ? null : requestStatements.get(k.name)!
      for (const connections of [1, 50]) {
        say(`${k.name} at ${connections} connection(s)…`)
        const app = await load({ path: k.path, method: k.method, body: k.body, token: k.token, connections })
        const raw = await baseline(base, connections)
        const kept = perRequest && !sameSql(perRequest, base) ? await baseline(perRequest, connections) : null
        rows.push({ name: k.name, read: k.read, connections, app, pg: raw, statements: base.length, ratio: raw && raw.rps > 0 ? app.rps / raw.rps : null,
          ...(kept && { pgPerRequest: kept, perRequestStatements: perRequest!.length, perRequestRatio: kept.rps > 0 ? app.rps / kept.rps : null }) })
      }
    }
    if (want('endpoints')) results.endpoints = rows

    // The alert scan: incremental over 10,000 new readings, then a full run over everything.
    if (want('alerts')) {
    say('alert scan…')
    const scan = (env: Record<string, string> = {}) => {
      const t = Date.now()
      const r = spawnSync(bin('tsx'), ['scripts/task-alerts.ts'], { cwd: root, env: { ...process.env, DATABASE_URL: DB_URL, ...env }, encoding: 'utf8', timeout: 180_000 })
      const seconds = (Date.now() - t) / 1000
      // The task reports its own time inside the scan (scanMs); the rest is starting the process.
      const reported = (() => {
        try {
          return JSON.parse(r.stdout.trim().split('\n').at(-1) ?? '{}') as { scanMs?: number, readingsScanned?: number }
        }
        catch {
          return {}
        }
      })()
      return { seconds, scanSeconds: reported.scanMs == null ? null : reported.scanMs / 1000, readingsScanned: reported.readingsScanned ?? null, ok: r.status === 0, output: (r.stdout || r.stderr || '').trim().slice(-300) }
    }
    await c.query(`insert into task_watermarks (name, last_seq) values ('alerts:scan', (select coalesce(max(seq), 0) from readings)) on conflict (name) do update set last_seq = excluded.last_seq`)
    await c.query(`insert into readings (id, company_id, feature_id, source, taken_at, ph, total_ammonia_mg_l, overall, evaluation)
      select gen_random_uuid(), f.company_id, f.id, 'technician', now() - (g % 50) * interval '1 minute', 7.5, 0.1, 'ok', '[]'::jsonb from water_features f cross join generate_series(1, 2) g limit 10000`)
    const incremental = scan()
    await c.query(`update task_watermarks set last_seq = 0 where name = 'alerts:scan'`)
    const full = scan()
    results.alertScan = { incremental10k: incremental, fullRun: full, note: 'One run reads every new reading (in batches of whole features inside one transaction); scan time is measured inside the task, process start is the rest.' }
    }

    // Renewals: every active contract whose term ends soonest, renewed by the billing job as of 10 days before its end.
    if (want('renewals')) {
    say('renewals…')
    const { rows: [term] } = await c.query(`select term_end::text as end, count(*)::int as n from contracts where status = 'active' group by 1 order by 2 desc limit 1`)
    const day = new Date(Date.parse(term.end) - 10 * 86_400_000).toISOString().slice(0, 10)
    const t = Date.now()
    const renew = spawnSync(bin('tsx'), ['scripts/task-billing.ts', '--company', companyId, '--today', day], { cwd: root, env: { ...process.env, DATABASE_URL: DB_URL, STRIPE_SECRET_KEY: '' }, encoding: 'utf8', timeout: 600_000 })
    const seconds = (Date.now() - t) / 1000
    const summary = (() => {
      try {
        return JSON.parse(renew.stdout.trim().split('\n').at(-1) ?? '{}')
      }
      catch {
        return {}
      }
    })()
    const dup = (await c.query(`select (select count(*) from (select previous_contract_id from contracts where previous_contract_id is not null group by 1 having count(*) > 1) d)::int as contracts,
      (select count(*) from (select billing_key from invoices where billing_key is not null group by company_id, billing_key having count(*) > 1) d)::int as invoices`)).rows[0]
    // The job's own time (measured inside it, every step: renewals, terms, invoices, reminders); process start is the rest.
    const jobSeconds: number = summary.seconds?.total ?? seconds
    results.renewals = { asOf: day, eligible: term.n, renewed: summary.renewed ?? 0, invoicesRaised: summary.invoicesRaised ?? 0, reminders: summary.reminders ?? 0, seconds, jobSeconds, steps: summary.seconds ?? null,
      per10kSeconds: summary.renewed ? (jobSeconds / summary.renewed) * 10_000 : null, duplicates: dup, note: 'Payment provider calls are off for this measurement (STRIPE_SECRET_KEY unset); they are retried by the job separately.' }
    }

    // JavaScript on first load, per page, gzipped, measured in the browser.
    if (want('pages')) {
    say('page weights…')
    const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium', args: ['--headless', '--no-sandbox', '--disable-gpu'] })
    const { rows: [visit] } = await c.query(`select id from visits where technician_id = (select id from users where email = $1) order by scheduled_on desc limit 1`, [techEmail])
    const pages: Record<string, number> = {}
    for (const [who, token, paths] of [['technician', tech, ['/today', ...(visit ? [`/visits/${visit.id}`] : [])]], ['owner', owner, ['/', '/invoices', '/revenue', '/schedule']]] as const) {
      for (const path of paths) {
        const ctx = await browser.newContext()
        // The HttpOnly session cookie and nuxt-auth's marker cookie (see nuxt.config.ts): without the
        // marker the app treats the browser as signed out and every page measures the sign-in page.
        await ctx.addCookies([{ name: 'auth.token', value: token, url: BASE }, { name: 'auth.session', value: 'cookie', url: BASE }])
        const page = await ctx.newPage()
        // Every script the page loads, once each, gzipped (the server sends them uncompressed).
        // Counted until the load event: later prefetches of other pages' chunks are not this page's weight.
        const sizes = new Map<string, Promise<number>>()
        let loaded = false
        page.on('response', (r) => {
          if (loaded || r.request().resourceType() !== 'script' || sizes.has(r.url())) return
          sizes.set(r.url(), r.body().then(b => gzipSync(b).length, () => 0))
        })
        await page.goto(`${BASE}${path}`, { waitUntil: 'load' })
        loaded = true
        const bytes = (await Promise.all(sizes.values())).reduce((a, b) => a + b, 0)
        pages[`${who} ${path.replace(/[0-9a-f-]{36}/, ':id')}`] = Math.round(bytes / 1024)
        await ctx.close()
      }
    }
    await browser.close()
    results.pageJsKbGzip = pages
    }

    // Every list is paginated: ask for 1,000 rows and get 100 at most (or a 400).
    if (want('pagination')) {
    say('pagination…')
    const lists = ['/api/customers', '/api/sites', '/api/features', '/api/contracts', '/api/visits', '/api/invoices', '/api/alerts', '/api/users', '/api/audit', '/api/plans', '/api/products', `/api/features/${feature.id}/readings`, `/api/features/${feature.id}/visits`, '/api/requests', '/api/outbox']
    const paged: Record<string, string> = {}
    for (const l of lists) {
      const r = await fetch(`${BASE}${l}?pageSize=1000`, { headers: { authorization: `Bearer ${owner}` } })
      const body = await r.json().catch(() => ({})) as { rows?: unknown[] }
      const all = await (await fetch(`${BASE}${l}`, { headers: { authorization: `Bearer ${owner}` } })).json().catch(() => ({})) as { rows?: unknown[] }
      paged[l] = r.status === 400 ? `refuses pageSize=1000; default page ${all.rows?.length ?? '?'} rows` : `returned ${body.rows?.length ?? '?'} rows`
    }
    results.pagination = paged
    }

    // The statements each read sends, and EXPLAIN ANALYZE of the slowest of them.
    const explain: Record<string, string> = {}
    for (const k of cases.filter(x => x.read && statements.has(x.name))) {
      const timed = []
      for (const q of statements.get(k.name)!) {
        const t = performance.now()
        await c.query(q.sql, q.params)
        timed.push({ q, ms: performance.now() - t })
      }
      const slowest = timed.sort((a, b) => b.ms - a.ms)[0]
      explain[k.name] = slowest
        ? `${timed.length} statement(s); the slowest:\n\n${(await c.query(`explain (analyze, buffers off, timing off, summary on) ${slowest.q.sql}`, slowest.q.params)).rows.map(r => r['QUERY PLAN']).join('\n')}`
        : 'no statements: the app answers from memory once the session is known'
    }
    results.explain = explain
    results.statements = Object.fromEntries([...statements].map(([name, list]) => [name, list.map(q => q.sql)]))
    results.requestStatements = Object.fromEntries([...requestStatements].filter(([name, list]) => !sameSql(list, statements.get(name)!)).map(([name, list]) => [name, list.map(q => q.sql)]))
  }
  finally {
    await stopServer(server)
    await c.end()
  }
  saveResults(results)
}

/** Writes bench/results/latest.json and summary.md (git keeps their history); with --only, merged over the earlier latest.json. */
function saveResults(results: Record<string, unknown>) {
  const dir = resolve(root, 'bench/results')
  mkdirSync(dir, { recursive: true })
  if (values.only && existsSync(resolve(dir, 'latest.json'))) {
    const earlier = JSON.parse(readFileSync(resolve(dir, 'latest.json'), 'utf8'))
    Object.assign(results, { ...earlier, ...Object.fromEntries(Object.entries(results).filter(([k]) => !['at', 'counts', 'durationSeconds', 'budgets', 'seedSeconds'].includes(k))) })
  }
  writeFileSync(resolve(dir, 'latest.json'), `${JSON.stringify(results, null, 2)}\n`)
  writeFileSync(resolve(dir, 'summary.md'), summaryMd(results))
  say('written bench/results/latest.json and bench/results/summary.md')
}

/** What the measurements on this 2-core machine come down to, where a budget is missed. */
const WHY = [
  'How the app is measured: `scripts/serve.mjs` with one worker per core behind one port, as `npm start` runs it, on the same 2 cores as PostgreSQL and the load generator. Each worker keeps sessions a few seconds (server/utils/session-cache.ts, cleared on every instance by LISTEN/NOTIFY), so a warm request sends only the statements of its answer.',
  'The pg baseline is the exact statements the app sends to build the same answer (RILLBOOK_LOG_SQL on a server that keeps no answers), replayed as plain queries from a pool of 20 in the bench process. The app runs its busiest reads (Today, a feature, its ranges) as prepared statements (preparedQuery in server/utils/db.ts).',
  'Answers kept until their inputs change: the revenue view, a feature\'s series, a technician\'s Today, the schedule board, the customers list and the invoices table are kept per process under change counters that PostgreSQL triggers raise in the same transaction as every write they depend on (server/utils/versioned-cache.ts; topics in server/db/schema/change-counters.ts), so they are exact on every instance (tests/api/kept-answers.test.ts and charts.test.ts compare them after every kind of change with an instance that keeps nothing). A warm request then sends one statement (the counters, or its access check with them); its ratio against that one statement is in the last column, well under 40 %: an HTTP request costs far more than a one-row index read. The "pg" columns are the statements that build the answer, as a request that finds nothing kept sends them.',
  'The schedule week at scale answers each technician-day\'s load (technician_day_loads, kept by statement-level triggers; driving worked out on first read and stored) and how many visits there are, never a silently cut list; the visit cards come for one technician or one day.',
  'Sign-in is slow on purpose: argon2id with 19 MiB and two passes per attempt (OWASP\'s minimum) costs tens of milliseconds of CPU each; it has no read budget.',
  'The alert scan reads every new reading in one run, in batches of whole features: the previous reading of each comes from one lateral query per batch, the alerts of a batch are loaded with one query and written with one multi-row insert and one multi-row update. The e-mails of `act` alerts are still queued per feature (a few queries each).',
  'Renewals: the job works set-based. Contracts are renewed 2,000 to a transaction: the next terms, their features and the audit with one insert each; the batch\'s visits worked out in memory from its company, templates, closed days, features and existing visits read once per batch (windows once per plan and term, the customers\' previous technicians with one query), placed by one planner run per batch (which answers only for the days it placed on, not for the season\'s other booked days), and written with one multi-row insert; contract_planned_visits, technician_day_loads and the change counters follow with one trigger call per statement. Invoices are raised 500 to a transaction (one insert of the invoices, already numbered from one counter update, one of their lines, one of their e-mails, one of the audit; still once per billing_key), and overdue reminders go 500 to a transaction the same way; a batch that fails is done again one by one. What is left is mostly the planner (its work grows with the season already booked) and PostgreSQL\'s per-row cost of inserting about 36 visits per contract (six foreign keys and six indexes each).',
  'Page weight: echarts loads only on the pages that draw a chart (app/components/charts/EChart.client.vue).',
]

function summaryMd(r: Record<string, any>) {
  const ok = (b: boolean) => (b ? 'met' : '**missed**')
  const lines = [`# Benchmark summary`, '', `Run ${r.at} on this machine, ${r.durationSeconds} s per measurement. Data: ${Object.entries(r.counts ?? {}).map(([k, v]) => `${v} ${k}`).join(', ')}.`, '',
    ...(r.seedSeconds ? [`Generating it (npm run db:seed:scale) took ${r.seedSeconds.toFixed(0)} s (budget 180 s: ${ok(r.seedSeconds < 180)}).`, ''] : []),
    ...(r.endpoints ? [`The app runs as \`npm start\` runs it: scripts/serve.mjs with ${r.workers ?? 1} worker(s) on one port. The "pg" columns replay, straight through pg from a pool in the bench process, the exact statements the app sends to build the same answer from the database (captured with RILLBOOK_LOG_SQL from a server that keeps no answers, RILLBOOK_ANSWER_CACHE=0; listed at the end). Where the app keeps an answer until its inputs change (the revenue view, a feature's series), a warm request sends only its access check with the change counters; the last column compares the app with those statements alone. The schedule week is the season's busiest (${r.scheduleWeek?.from}, ${r.scheduleWeek?.visits} visits). Today is measured on a full technician-day of the planned season, whatever the date of the run (${r.todayDay?.date}, ${r.todayDay?.stops} stops: nine in ten of the season's technician-days have no more).`, ''] : []),
    '| endpoint | connections | app req/s | app p95 ms | errors | pg req/s | pg p95 ms | app ÷ pg | p95 budget (reads, 50 conn.) | throughput budget (≥ 40 %) | answer kept: app ÷ pg of what a warm request sends |', '| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |']
  for (const e of r.endpoints ?? []) {
    const failed = e.app.errors + e.app.non2xx
    const p95Budget = e.read && e.connections === 50 ? ok(e.app.rps > 0 && e.app.p95 <= r.budgets.p95Ms && failed === 0) : '—'
    const ratioBudget = e.read && e.connections === 50 ? ok((e.ratio ?? 0) >= r.budgets.throughputRatio) : '—'
    const kept = e.pgPerRequest ? `${e.perRequestStatements} statement(s), ${e.pgPerRequest.rps.toFixed(0)} req/s through pg: ${((e.perRequestRatio ?? 0) * 100).toFixed(0)} %` : '—'
    lines.push(`| ${e.name} | ${e.connections} | ${e.app.rps.toFixed(0)} | ${e.app.p95.toFixed(1)} | ${failed} | ${e.pg ? e.pg.rps.toFixed(0) : '—'} | ${e.pg ? e.pg.p95.toFixed(1) : '—'} | ${e.ratio == null ? '—' : `${(e.ratio * 100).toFixed(0)} %`} | ${p95Budget} | ${ratioBudget} | ${kept} |`)
  }
  const a = r.alertScan
  const scanS = (x: { seconds: number, scanSeconds?: number | null }) => x.scanSeconds ?? x.seconds
  if (a) lines.push('', `Alert scan: incremental run over 10,000 new readings ${scanS(a.incremental10k).toFixed(2)} s of scan time (budget ${r.budgets.alertIncrementalS} s: ${ok(scanS(a.incremental10k) <= r.budgets.alertIncrementalS)}; ${a.incremental10k.seconds.toFixed(1)} s with starting the process); full run over the whole history (${a.fullRun.readingsScanned ?? '—'} readings) ${scanS(a.fullRun).toFixed(1)} s (budget ${r.budgets.alertFullS} s: ${ok(scanS(a.fullRun) <= r.budgets.alertFullS)}; ${a.fullRun.seconds.toFixed(1)} s with starting the process). ${a.note}`)
  const n = r.renewals
  if (n) {
    const job = n.jobSeconds ?? n.seconds
    const steps = n.steps ? ` (renewals ${n.steps.renewals.toFixed(1)} s, invoices ${n.steps.invoices.toFixed(1)} s, reminders ${n.steps.reminders.toFixed(1)} s)` : ''
    lines.push('', `Renewals: ${n.renewed} of ${n.eligible} contracts renewed, ${n.invoicesRaised} invoices raised and ${n.reminders ?? '—'} overdue reminders sent by one run of the billing job as of ${n.asOf}, in ${job.toFixed(1)} s of job time${steps}; at that rate 10,000 contracts take ${n.per10kSeconds?.toFixed(0) ?? '—'} s (budget 60 s: ${ok((n.per10kSeconds ?? Infinity) <= r.budgets.renew10kS)}; ${n.seconds.toFixed(1)} s with starting the process). Duplicates: ${n.duplicates.contracts} contracts, ${n.duplicates.invoices} invoices. ${n.note}`)
  }
  if (r.pageJsKbGzip) {
    lines.push('', '| page | JavaScript on first load (kB gzip) |', '| --- | --- |')
    for (const [p, kb] of Object.entries(r.pageJsKbGzip)) lines.push(`| ${p} | ${kb} (budget ${r.budgets.visitPageJsKb} kB: ${ok((kb as number) <= r.budgets.visitPageJsKb)}) |`)
  }
  const pl = r.planner
  if (pl?.data?.source) {
    lines.push('', `Season planner on the large company's own season (${pl.data.visits} visits of ${pl.data.customers} customers, ${pl.data.technicians} technicians, ${pl.data.season.start} to ${pl.data.season.end}, visit time ${(pl.data.visitMinutes / pl.data.capacityMinutes * 100).toFixed(0)} % of their time): planned in ${pl.planner.seconds.toFixed(1)} s (budget < ${pl.budgets.seconds} s: ${ok(pl.met.seconds)}); technician-days over capacity ${pl.planner.daysOverCapacity} (budget ${pl.budgets.daysOverCapacity}: ${ok(pl.met.daysOverCapacity)}); unplaced ${pl.planner.unplaced}${pl.planner.unplaced ? ` (${Object.entries(pl.unplaced.groups).map(([k, v]) => `${v} ${k}`).join('; ')})` : ''}, baseline ${pl.baseline.unplaced}; driving ${pl.planner.totalKm} km against the baseline's ${pl.baseline.totalKm} km, ${pl.savingPercent.toFixed(1)} % less (budget: less than the baseline: ${ok(pl.met.drivesLess)}), per placed visit ${pl.planner.kmPerPlacedVisit.toFixed(2)} against ${pl.baseline.kmPerPlacedVisit.toFixed(2)} km.`)
  }
  const syn = r.plannerSynthetic
  if (syn) lines.push('', `Synthetic season (bench/planner.ts, ${syn.data.visits} visits, ${syn.data.technicians} technicians): planned in ${syn.planner.seconds.toFixed(1)} s; ${syn.planner.daysOverCapacity} technician-days over capacity; ${syn.planner.unplaced} unplaced; ${syn.savingPercent.toFixed(1)} % less driving than the baseline.`)
  if (r.pagination) {
    lines.push('', 'Pagination (every list asked for 1,000 rows):', '')
    for (const [p, v] of Object.entries(r.pagination)) lines.push(`- \`${p}\`: ${v}`)
  }
  lines.push('', '## How it is measured, and what each part does', '', ...WHY.map(w => `- ${w}`))
  if (r.explain) {
    lines.push('', '## EXPLAIN ANALYZE of the baseline queries', '')
    for (const [k, v] of Object.entries(r.explain)) lines.push(`### ${k}`, '', '```', v as string, '```', '')
  }
  const listed = (title: string, lists: Record<string, string[]> | undefined) => {
    if (!lists || !Object.keys(lists).length) return
    lines.push('', title, '')
    for (const [k, list] of Object.entries(lists)) lines.push(`### ${k}`, '', ...(list.length ? list.map(q => `- \`${q.replace(/\s+/g, ' ').slice(0, 400)}\``) : ['- none']), '')
  }
  listed('## The statements that build each answer', r.statements)
  listed('## The statements a warm request sends where its answer is kept', r.requestStatements)
  return `${lines.join('\n')}\n`
}

main().catch((err) => {
  say(err.stack || err.message)
  process.exit(1)
})
