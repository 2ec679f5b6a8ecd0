// Global setup shared by the api and browser projects: a throwaway PostgreSQL on loopback, the
// migrations and demo data, a fresh build, the local mail catcher, and the built server on its
// own port. It runs once per `vitest run` even though two projects list it (the state lives on
// globalThis).
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { createWriteStream, mkdirSync, readFileSync, rmSync } from 'node:fs'
import net from 'node:net'
import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
// @ts-expect-error plain ESM script without types
import { clusterConfig, ensureDatabase, start as startDb, stop as stopDb, urlFor } from '../../scripts/db.mjs'
// @ts-expect-error plain ESM script without types
import { runMigrations } from '../../scripts/migrate.mjs'
// @ts-expect-error plain ESM script without types
import { startPaymentFake } from '../../scripts/payment-fake.mjs'

const root = resolve(import.meta.dirname, '../..')
const PORT = Number(process.env.RILLBOOK_TEST_PORT || 3199)
const UPLOADS_DIR = resolve(root, '.data/uploads-test')
const SMTP_PORT = Number(process.env.RILLBOOK_TEST_SMTP_PORT || 2526)
const MAIL_DIR = resolve(root, '.data/mail-test')
/** Everything the test server prints, for the test that checks no secret reaches the logs. */
const SERVER_LOG = resolve(root, '.data/test-server.log')
const PAYMENTS_PORT = Number(process.env.RILLBOOK_TEST_PAYMENTS_PORT || 12112)
const PAYMENTS_DIR = resolve(root, '.data/payments-test')
/** The test run's payment settings: the SDK goes to the local fake, which signs webhooks with this secret. */
const STRIPE_TEST = { STRIPE_SECRET_KEY: 'sk_test_rillbook_tests', STRIPE_WEBHOOK_SECRET: 'whsec_rillbook_tests', STRIPE_API_URL: `http://127.0.0.1:${PAYMENTS_PORT}` }

interface TestEnv { baseUrl: string, databaseUrl: string, adminUrl: string, server: ChildProcess, ownsCluster: boolean, users: number, payments: { close: () => Promise<void> } }
const g = globalThis as unknown as { __rillbookTestEnv?: Promise<TestEnv> }

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv) {
  const r = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env })
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed`)
}

async function waitFor(url: string, server: ChildProcess) {
  const deadline = Date.now() + 30_000
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error('the test server exited')
    try {
      const r = await fetch(url)
      if (r.ok) return
    }
    catch {}
    await new Promise(r => setTimeout(r, 200))
  }
  throw new Error(`the test server did not answer at ${url}`)
}

function portAnswers(port: number) {
  return new Promise<boolean>((done) => {
    const s = net.connect({ host: '127.0.0.1', port })
    s.once('connect', () => { s.destroy(); done(true) })
    s.once('error', () => done(false))
  })
}

async function waitForPort(port: number, open: boolean, what: string) {
  const deadline = Date.now() + 15_000
  while (Date.now() < deadline) {
    if (await portAnswers(port) === open) return
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error(`${what}: 127.0.0.1:${port} ${open ? 'never answered' : 'is still taken'}`)
}

/** The pid the catcher (or tests/helpers/mail.ts after a restart) wrote to its pid file. */
function catcherPid(): number | null {
  try {
    const pid = Number(readFileSync(resolve(MAIL_DIR, 'catcher.pid'), 'utf8').trim())
    return Number.isInteger(pid) && pid > 0 ? pid : null
  }
  catch {
    return null
  }
}

function killCatcher() {
  const pid = catcherPid()
  if (!pid) return
  try {
    process.kill(pid, 'SIGTERM')
  }
  catch {}
}

/** An empty mailbox and a fresh catcher on SMTP_PORT (a catcher left by an aborted run is stopped first). */
async function startCatcher() {
  if (await portAnswers(SMTP_PORT)) {
    killCatcher()
    await waitForPort(SMTP_PORT, false, 'a mail catcher from an earlier run (see .data/mail-test/catcher.pid)')
  }
  rmSync(MAIL_DIR, { recursive: true, force: true })
  mkdirSync(MAIL_DIR, { recursive: true })
  const catcher = spawn(process.execPath, [resolve(root, 'scripts/mail-catcher.mjs'), '--port', String(SMTP_PORT), '--dir', MAIL_DIR], {
    cwd: root,
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  const deadline = Date.now() + 15_000
  while (!(await portAnswers(SMTP_PORT)) || catcherPid() !== catcher.pid) {
    if (catcher.exitCode !== null) throw new Error('the mail catcher exited')
    if (Date.now() > deadline) throw new Error(`the mail catcher did not listen on 127.0.0.1:${SMTP_PORT}`)
    await new Promise(r => setTimeout(r, 100))
  }
}

async function bringUp(): Promise<TestEnv> {
  let databaseUrl: string
  let adminUrl: string
  const external = process.env.TEST_DATABASE_URL
  if (external) {
    databaseUrl = external
    adminUrl = external
  }
  else {
    const cfg = clusterConfig({ name: 'pg-test', port: Number(process.env.RILLBOOK_TEST_PG_PORT || 54339), database: 'rillbook_test', fast: true })
    await startDb(cfg)
    await ensureDatabase(cfg, 'rillbook_test', { fresh: true })
    databaseUrl = urlFor(cfg)
    adminUrl = urlFor(cfg, 'postgres')
  }
  await runMigrations(databaseUrl)
  const env = { ...process.env, DATABASE_URL: databaseUrl }
  run(resolve(root, 'node_modules/.bin/tsx'), ['scripts/seed.ts'], env)
  if (process.env.RILLBOOK_TEST_SKIP_BUILD !== '1') run(resolve(root, 'node_modules/.bin/nuxt'), ['build'], env)
  await startCatcher()
  rmSync(UPLOADS_DIR, { recursive: true, force: true })
  if (await portAnswers(PAYMENTS_PORT)) throw new Error(`127.0.0.1:${PAYMENTS_PORT} is taken (a payment fake from an earlier run?); stop it or set RILLBOOK_TEST_PAYMENTS_PORT`)
  rmSync(PAYMENTS_DIR, { recursive: true, force: true })
  const payments = await startPaymentFake({
    port: PAYMENTS_PORT, dir: PAYMENTS_DIR, webhookUrl: `http://127.0.0.1:${PORT}/api/webhooks/payments`,
    webhookSecret: STRIPE_TEST.STRIPE_WEBHOOK_SECRET, publicBaseUrl: `http://127.0.0.1:${PAYMENTS_PORT}`,
  })

  const server = spawn(process.execPath, [resolve(root, '.output/server/index.mjs')], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...env,
      NITRO_HOST: '127.0.0.1',
      NITRO_PORT: String(PORT),
      // Tests pose as other addresses through X-Forwarded-For to exercise the per-address limit.
      RILLBOOK_TRUST_PROXY: '1',
      // All mail goes to the catcher; tests read it from MAIL_DIR (tests/helpers/mail.ts).
      RILLBOOK_MAIL_DIR: MAIL_DIR,
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(SMTP_PORT),
      SMTP_SECURE: '0',
      SMTP_USER: '',
      // Photos of the test run, away from the demo's.
      RILLBOOK_UPLOADS_DIR: UPLOADS_DIR,
      RILLBOOK_UPLOADS_DRIVER: 'fs',
      // Payments through the provider's SDK to the local fake; links in e-mails to this server.
      ...STRIPE_TEST,
      RILLBOOK_PUBLIC_URL: `http://127.0.0.1:${PORT}`,
    },
  })
  const log = createWriteStream(SERVER_LOG, { flags: 'w' })
  for (const out of [server.stdout!, server.stderr!]) {
    out.on('data', (chunk: Buffer) => {
      log.write(chunk)
      process.stderr.write(chunk)
    })
  }
  const baseUrl = `http://127.0.0.1:${PORT}`
  try {
    await waitFor(`${baseUrl}/api/health`, server)
  }
  catch (err) {
    server.kill('SIGTERM')
    killCatcher()
    await payments.close()
    throw err
  }
  return { baseUrl, databaseUrl, adminUrl, server, ownsCluster: !external, users: 0, payments }
}

export async function setup(project: TestProject) {
  g.__rillbookTestEnv ??= bringUp()
  const env = await g.__rillbookTestEnv
  env.users++
  project.provide('baseUrl', env.baseUrl)
  project.provide('databaseUrl', env.databaseUrl)
  project.provide('adminUrl', env.adminUrl)
  project.provide('mailDir', MAIL_DIR)
  project.provide('smtpPort', SMTP_PORT)
  project.provide('paymentsUrl', STRIPE_TEST.STRIPE_API_URL)
  project.provide('paymentsEnv', STRIPE_TEST)
  project.provide('serverLog', SERVER_LOG)
  // The built server's process, so memory tests can read its resident size from /proc.
  project.provide('serverPid', env.server.pid!)
}

export async function teardown() {
  const env = await g.__rillbookTestEnv
  if (!env || --env.users > 0) return
  env.server.kill('SIGTERM')
  await env.payments.close()
  // By the pid file: a test may have stopped the first catcher and started another.
  killCatcher()
  if (env.ownsCluster) stopDb(clusterConfig({ name: 'pg-test', port: Number(process.env.RILLBOOK_TEST_PG_PORT || 54339) }))
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    adminUrl: string
    mailDir: string
    smtpPort: number
    paymentsUrl: string
    paymentsEnv: Record<string, string>
    serverLog: string
    serverPid: number
  }
}
