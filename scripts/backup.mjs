#!/usr/bin/env node
// Backups with PostgreSQL's own tools, against DATABASE_URL or the project-local server.
//   npm run db:backup                       → .data/backups/rillbook-<time>.dump (pg_dump custom format)
//   npm run db:backup -- --file x.dump
//   npm run db:restore -- --file x.dump     → restores into DATABASE_URL (or --into <url>), replacing what is there
// The custom format is compressed and restores table by table with pg_restore; a restore runs in
// one transaction, so a failed one leaves the target as it was.
import { spawnSync } from 'node:child_process'
import { mkdirSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { clusterConfig, pgTool, urlFor } from './db.mjs'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')
const say = msg => process.stderr.write(`[backup] ${msg}\n`)

function arg(name) {
  const i = process.argv.indexOf(name)
  return i > -1 ? process.argv[i + 1] : undefined
}

function run(tool, args) {
  const r = spawnSync(pgTool(tool), args, { stdio: ['ignore', 'inherit', 'inherit'] })
  if (r.error) throw new Error(`${tool} could not run: ${r.error.message}`)
  if (r.status !== 0) throw new Error(`${tool} failed (exit ${r.status})`)
}

/** Writes a custom-format dump of `url` to `file`. */
export function backup(url, file) {
  mkdirSync(dirname(file), { recursive: true })
  run('pg_dump', ['--format=custom', '--no-owner', '--no-privileges', '--file', file, url])
  return file
}

/** Restores `file` into `url`, dropping the objects it replaces, in a single transaction. */
export function restore(url, file) {
  run('pg_restore', ['--clean', '--if-exists', '--no-owner', '--no-privileges', '--single-transaction', '--exit-on-error', '--dbname', url, file])
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const command = process.argv[2]
  const url = arg('--into') || process.env.DATABASE_URL || urlFor(clusterConfig())
  try {
    if (command === 'backup') {
      const file = resolve(arg('--file') || resolve(root, '.data/backups', `rillbook-${new Date().toISOString().replace(/[:.]/g, '-')}.dump`))
      backup(url, file)
      say(`written ${file}`)
    }
    else if (command === 'restore') {
      const file = arg('--file')
      if (!file) throw new Error('say which dump to restore: --file <path>')
      restore(url, resolve(file))
      say(`restored ${file}`)
    }
    else throw new Error('use: backup.mjs backup [--file f] | restore --file f [--into url]')
  }
  catch (err) {
    say(err.message)
    process.exit(1)
  }
}
