// Global setup shared by the api and browser projects: a throwaway PostgreSQL on loopback, the
// migrations and demo data, a fresh build, and the built server on its own port. It runs once
// per `vitest run` even though two projects list it (the state lives on globalThis).
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
// @ts-expect-error plain ESM script without types
import { clusterConfig, ensureDatabase, start as startDb, stop as stopDb, urlFor } from '../../scripts/db.mjs'
// @ts-expect-error plain ESM script without types
import { runMigrations } from '../../scripts/migrate.mjs'

const root = resolve(import.meta.dirname, '../..')
const PORT = Number(process.env.RILLBOOK_TEST_PORT || 3199)

interface TestEnv { baseUrl: string, databaseUrl: string, adminUrl: string, server: ChildProcess, ownsCluster: boolean, users: number }
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

  const server = spawn(process.execPath, [resolve(root, '.output/server/index.mjs')], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
    env: {
      ...env,
      NITRO_HOST: '127.0.0.1',
      NITRO_PORT: String(PORT),
      // Tests pose as other addresses through X-Forwarded-For to exercise the per-address limit.
      RILLBOOK_TRUST_PROXY: '1',
    },
  })
  const baseUrl = `http://127.0.0.1:${PORT}`
  await waitFor(`${baseUrl}/api/health`, server)
  return { baseUrl, databaseUrl, adminUrl, server, ownsCluster: !external, users: 0 }
}

export async function setup(project: TestProject) {
  g.__rillbookTestEnv ??= bringUp()
  const env = await g.__rillbookTestEnv
  env.users++
  project.provide('baseUrl', env.baseUrl)
  project.provide('databaseUrl', env.databaseUrl)
  project.provide('adminUrl', env.adminUrl)
}

export async function teardown() {
  const env = await g.__rillbookTestEnv
  if (!env || --env.users > 0) return
  env.server.kill('SIGTERM')
  if (env.ownsCluster) stopDb(clusterConfig({ name: 'pg-test', port: Number(process.env.RILLBOOK_TEST_PG_PORT || 54339) }))
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    adminUrl: string
  }
}
