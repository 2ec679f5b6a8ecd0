// Two more app instances for tests/api/instances.test.ts: the same build (.output) as the test
// server, the same PostgreSQL, mail catcher and payment fake, and photos in a local
// S3-compatible store (s3rver on loopback) instead of a folder.
import { spawn, type ChildProcess } from 'node:child_process'
import { createWriteStream, mkdirSync, readdirSync, rmSync } from 'node:fs'
import { resolve } from 'node:path'
import pg from 'pg'
// @ts-expect-error s3rver ships no types
import S3rver from 's3rver'
import { inject } from 'vitest'

const root = resolve(import.meta.dirname, '../..')
/** s3rver on this port, the instances on the next ones: 20 above the test server's (RILLBOOK_TEST_INSTANCE_PORT overrides). */
const BASE_PORT = Number(process.env.RILLBOOK_TEST_INSTANCE_PORT || Number(process.env.RILLBOOK_TEST_PORT || 3199) + 20)
const S3_DIR = resolve(root, '.data/s3-test')
export const S3_BUCKET = 'rillbook-test'
// s3rver's fixed credentials: the driver signs every request with them.
const S3_KEYS = { RILLBOOK_S3_ACCESS_KEY_ID: 'S3RVER', RILLBOOK_S3_SECRET_ACCESS_KEY: 'S3RVER' }

export interface Instance { name: string, baseUrl: string, appName: string, child: ChildProcess }

/** A fresh, empty bucket on loopback. */
export async function startS3() {
  rmSync(S3_DIR, { recursive: true, force: true })
  mkdirSync(S3_DIR, { recursive: true })
  const server = new S3rver({ address: '127.0.0.1', port: BASE_PORT, silent: true, directory: S3_DIR, configureBuckets: [{ name: S3_BUCKET, configs: [] }] })
  await server.run()
  return { endpoint: `http://127.0.0.1:${BASE_PORT}`, close: () => server.close() }
}

/** Every file name s3rver keeps, relative to its folder (to show where an upload went). */
export function s3Files(dir = S3_DIR): string[] {
  return readdirSync(dir, { recursive: true, encoding: 'utf8' })
}

async function waitForHealth(inst: Instance, logFile: string) {
  const deadline = Date.now() + 60_000
  while (Date.now() < deadline) {
    if (inst.child.exitCode !== null) throw new Error(`instance ${inst.name} exited (see ${logFile})`)
    try {
      if ((await fetch(`${inst.baseUrl}/api/health`)).ok) return
    }
    catch {}
    await new Promise(r => setTimeout(r, 200))
  }
  throw new Error(`instance ${inst.name} did not answer at ${inst.baseUrl} (see ${logFile})`)
}

/**
 * Instance number `n` (1, 2, …) of the built server, its output in .data/test-instance-<name>.log.
 * Without `s3Endpoint` its photos stay in the test server's folder; `env` adds settings (e.g.
 * RILLBOOK_ANSWER_CACHE=0 for an instance that computes every answer afresh).
 */
export async function startInstance(name: string, n: number, s3Endpoint?: string, env: Record<string, string> = {}): Promise<Instance> {
  const port = BASE_PORT + n
  const baseUrl = `http://127.0.0.1:${port}`
  // Its database connections carry this name, so a test can see them in pg_stat_activity.
  const appName = `rillbook-instance-${name}`
  const child = spawn(process.execPath, [resolve(root, '.output/server/index.mjs')], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env,
      ...inject('paymentsEnv'),
      DATABASE_URL: inject('databaseUrl'),
      PGAPPNAME: appName,
      NITRO_HOST: '127.0.0.1',
      NITRO_PORT: String(port),
      RILLBOOK_MAIL_DIR: inject('mailDir'),
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(inject('smtpPort')),
      SMTP_SECURE: '0',
      SMTP_USER: '',
      ...(s3Endpoint ? { RILLBOOK_UPLOADS_DRIVER: 's3', RILLBOOK_S3_ENDPOINT: s3Endpoint, RILLBOOK_S3_BUCKET: S3_BUCKET, RILLBOOK_S3_REGION: 'us-east-1', ...S3_KEYS } : {}),
      RILLBOOK_PUBLIC_URL: baseUrl,
      ...env,
    },
  })
  const logFile = resolve(root, `.data/test-instance-${name}.log`)
  const log = createWriteStream(logFile, { flags: 'w' })
  child.stdout!.pipe(log)
  child.stderr!.pipe(log)
  const inst = { name, baseUrl, appName, child }
  try {
    await waitForHealth(inst, logFile)
  }
  catch (err) {
    child.kill('SIGTERM')
    throw err
  }
  return inst
}

export function stopInstance(inst: Instance | undefined) {
  if (!inst || inst.child.exitCode !== null) return Promise.resolve()
  return new Promise<void>((done) => {
    inst.child.once('exit', () => done())
    inst.child.kill('SIGTERM')
  })
}

/** A connection of the test's own, for holding locks while the instances race. */
export async function testClient() {
  const client = new pg.Client({ connectionString: inject('databaseUrl') })
  await client.connect()
  return client
}

/** Until `count` connections of these instances wait for a lock (true), or `ms` pass (false). */
export async function waitForLockWaiters(client: pg.Client, appNames: string[], count: number, ms = 15_000) {
  const deadline = Date.now() + ms
  while (Date.now() < deadline) {
    const { rows: [row] } = await client.query<{ n: number }>(
      `select count(*)::int as n from pg_stat_activity where application_name = any($1) and wait_event_type = 'Lock'`, [appNames])
    if (row!.n >= count) return true
    await new Promise(r => setTimeout(r, 50))
  }
  return false
}
