import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { resolve } from 'node:path'
import pg from 'pg'
import { afterAll, describe, expect, inject, it } from 'vitest'
// @ts-expect-error plain ESM script without types
import { backup, restore } from '../../scripts/backup.mjs'
// @ts-expect-error plain ESM script without types
import { clusterConfig, ensureDatabase, start as startDb, stop as stopDb, urlFor } from '../../scripts/db.mjs'
// @ts-expect-error plain ESM script without types
import { runMigrations } from '../../scripts/migrate.mjs'
import { DEMO_PASSWORD, demo } from '../helpers/api'

// Faults: the database going away under a running app, and backups that restore. (The mail
// server down: mail.test.ts; the payment provider down, a webhook twice or out of order, and the
// billing job killed half-way: billing-run.test.ts and invoices.test.ts.)
const root = resolve(import.meta.dirname, '../..')

async function tableCounts(url: string) {
  const c = new pg.Client({ connectionString: url })
  await c.connect()
  try {
    const { rows: tables } = await c.query<{ name: string }>(`select table_name as name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by 1`)
    const out: Record<string, number> = {}
    for (const t of tables) out[t.name] = Number((await c.query(`select count(*) as n from "${t.name}"`)).rows[0].n)
    return out
  }
  finally {
    await c.end()
  }
}

describe('backups', () => {
  it('npm run db:backup and db:restore: a fresh database gets the same rows', async () => {
    const file = resolve(root, '.data/backups/test-backup.dump')
    const source = inject('databaseUrl')
    let before: Record<string, number> = {}
    let after: Record<string, number> = {}
    for (let attempt = 0; attempt < 3; attempt++) {
      before = await tableCounts(source)
      backup(source, file)
      after = await tableCounts(source)
      if (JSON.stringify(before) === JSON.stringify(after)) break
    }
    expect(Object.keys(before).length).toBeGreaterThan(20)
    const admin = new pg.Client({ connectionString: inject('adminUrl') })
    await admin.connect()
    await admin.query('drop database if exists rillbook_restore with (force)')
    await admin.query('create database rillbook_restore')
    await admin.end()
    const target = new URL(source)
    target.pathname = '/rillbook_restore'
    restore(target.toString(), file)
    expect(await tableCounts(target.toString())).toEqual(before)
    expect(before.invoices).toBeGreaterThan(0)
    // The command line does the same.
    const r = spawnSync(process.execPath, ['scripts/backup.mjs', 'backup', '--file', resolve(root, '.data/backups/test-cli.dump')], { cwd: root, env: { ...process.env, DATABASE_URL: source }, encoding: 'utf8' })
    expect(r.status, r.stderr).toBe(0)
  })
})

describe('the database restarting under a running app', () => {
  const cfg = clusterConfig({ name: 'pg-fault', port: Number(process.env.RILLBOOK_TEST_PG_PORT || 54339) + 10, database: 'rillbook_fault', fast: true })
  const port = 3198
  let server: ChildProcess | undefined
  afterAll(() => {
    server?.kill('SIGTERM')
    try {
      stopDb(cfg)
    }
    catch {}
  })

  it('answers 503 while the database is down and recovers by itself when it is back', async () => {
    await startDb(cfg)
    await ensureDatabase(cfg, 'rillbook_fault', { fresh: true })
    const url = urlFor(cfg)
    await runMigrations(url)
    const seeded = spawnSync(resolve(root, 'node_modules/.bin/tsx'), ['scripts/seed.ts'], { cwd: root, env: { ...process.env, DATABASE_URL: url }, encoding: 'utf8' })
    expect(seeded.status, seeded.stderr).toBe(0)
    server = spawn(process.execPath, [resolve(root, '.output/server/index.mjs')], {
      cwd: root, stdio: 'ignore',
      env: { ...process.env, DATABASE_URL: url, NITRO_HOST: '127.0.0.1', NITRO_PORT: String(port), RILLBOOK_PG_CONNECT_TIMEOUT_MS: '2000', SMTP_HOST: '127.0.0.1', SMTP_PORT: String(inject('smtpPort')), ...inject('paymentsEnv') },
    })
    const base = `http://127.0.0.1:${port}`
    const get = (path: string, token?: string) => fetch(`${base}${path}`, { headers: token ? { authorization: `Bearer ${token}` } : {} }).then(async r => ({ status: r.status, body: await r.json().catch(() => null) })).catch(() => ({ status: 0, body: null }))
    await expect.poll(async () => (await get('/api/health')).status, { timeout: 30_000, interval: 250 }).toBe(200)
    const login = await fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: demo.owner, password: DEMO_PASSWORD }) })
    const { token } = await login.json() as { token: string }
    expect((await get('/api/customers?pageSize=1', token)).status).toBe(200)

    stopDb(cfg)
    const down = await get('/api/customers?pageSize=1', token)
    expect(down.status).toBe(503)
    expect(down.body.message).toMatch(/database is not reachable/)
    expect((await get('/api/health')).status).toBe(503)

    await startDb(cfg)
    await expect.poll(async () => (await get('/api/customers?pageSize=1', token)).status, { timeout: 20_000, interval: 250 }).toBe(200)
    expect((await get('/api/health')).status).toBe(200)
    expect(server.exitCode).toBeNull()
  }, 120_000)
})
