#!/usr/bin/env node
// The one-command runner: PostgreSQL (unless DATABASE_URL is set) → migrations → demo data when
// the database is empty → the local mail catcher (unless SMTP_HOST is set) → the local payment
// fake (unless STRIPE_SECRET_KEY is set) → build when none exists → the app on http://HOST:PORT.
// Migrations and the seed run here, once, before any worker starts.
//   node scripts/start.mjs          built server, one worker per core (RILLBOOK_WORKERS=n overrides)
//   node scripts/start.mjs --dev    Nuxt's dev server (npm run dev)
import { spawn, spawnSync } from 'node:child_process'
import { existsSync } from 'node:fs'
import net from 'node:net'
import { dirname, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { start as startDb } from './db.mjs'
import { startMailCatcher } from './mail-catcher.mjs'
import { installWebhookSecret, startPaymentFake } from './payment-fake.mjs'
import { runMigrations } from './migrate.mjs'
import { serveWorkers, workerCount } from './serve.mjs'

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..')
const dev = process.argv.includes('--dev')
const host = process.env.HOST || '127.0.0.1'
const port = Number(process.env.PORT || 3000)
const bin = name => resolve(root, 'node_modules', '.bin', name)
const say = msg => process.stderr.write(`[start] ${msg}\n`)

function portAnswers(h, p) {
  return new Promise((done) => {
    const s = net.connect({ host: h, port: p })
    s.once('connect', () => { s.destroy(); done(true) })
    s.once('error', () => done(false))
  })
}

async function main() {
  const workers = dev ? 1 : workerCount()
  if (await portAnswers(host, port)) {
    throw new Error(`something already listens on ${host}:${port}; stop it or set PORT`)
  }
  if (!process.env.DATABASE_URL) process.env.DATABASE_URL = await startDb()
  else say('using DATABASE_URL')
  await runMigrations(process.env.DATABASE_URL)
  say('migrations applied')
  const seeded = spawnSync(bin('tsx'), ['scripts/seed.ts', '--if-empty'], { cwd: root, stdio: 'inherit', env: process.env })
  if (seeded.status !== 0) throw new Error('seeding the demo data failed')

  const env = { ...process.env, HOST: host, PORT: String(port), NITRO_HOST: host, NITRO_PORT: String(port) }
  // No real SMTP server configured: catch every message locally (read them at /dev/mailbox).
  let catcher
  if (!process.env.SMTP_HOST) {
    const smtpPort = Number(process.env.RILLBOOK_SMTP_PORT || 2525)
    const mailDir = resolve(root, process.env.RILLBOOK_MAIL_DIR || '.data/mail')
    if (await portAnswers('127.0.0.1', smtpPort)) {
      throw new Error(`something already listens on 127.0.0.1:${smtpPort}; stop it, set RILLBOOK_SMTP_PORT, or set SMTP_HOST for a real mail server`)
    }
    catcher = await startMailCatcher({ port: smtpPort, dir: mailDir, log: msg => process.stderr.write(`${msg}\n`) })
    Object.assign(env, { RILLBOOK_MAIL_DIR: mailDir, SMTP_HOST: '127.0.0.1', SMTP_PORT: String(smtpPort) })
  }
  else say(`sending mail through ${process.env.SMTP_HOST}`)
  env.RILLBOOK_PUBLIC_URL ||= `http://${host}:${port}`
  // No payment provider configured: run the local fake and point the provider's SDK at it.
  let payments
  if (!process.env.STRIPE_SECRET_KEY) {
    const paymentsPort = Number(process.env.RILLBOOK_PAYMENTS_PORT || 12111)
    if (await portAnswers('127.0.0.1', paymentsPort)) {
      throw new Error(`something already listens on 127.0.0.1:${paymentsPort}; stop it, set RILLBOOK_PAYMENTS_PORT, or set STRIPE_SECRET_KEY for the real service`)
    }
    const paymentsDir = resolve(root, process.env.RILLBOOK_PAYMENTS_DIR || '.data/payments')
    // The fake and the app share this install's own signing secret (random, made on the first
    // start, kept in the git-ignored data folder), unless one is configured.
    const secret = process.env.STRIPE_WEBHOOK_SECRET || installWebhookSecret(paymentsDir)
    payments = await startPaymentFake({
      port: paymentsPort, dir: paymentsDir,
      webhookUrl: `http://${host}:${port}/api/webhooks/payments`, webhookSecret: secret, publicBaseUrl: `http://127.0.0.1:${paymentsPort}`,
    })
    Object.assign(env, { STRIPE_SECRET_KEY: 'sk_test_rillbook_local', STRIPE_WEBHOOK_SECRET: secret, STRIPE_API_URL: payments.url })
    say(`payments go to the local payment fake on ${payments.url} (test card 4242 4242 4242 4242)`)
  }
  else say(process.env.STRIPE_API_URL ? `payments go to ${process.env.STRIPE_API_URL}` : 'payments go to the payment provider')
  const closeFakes = () => Promise.race([Promise.all([catcher?.close(), payments?.close()]), new Promise(r => setTimeout(r, 1000))])
  if (dev) {
    const child = spawn(bin('nuxt'), ['dev', '--host', host, '--port', String(port)], { cwd: root, stdio: 'inherit', env })
    for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig))
    child.on('exit', async (code) => {
      await closeFakes()
      process.exit(code ?? 0)
    })
    return
  }
  const entry = resolve(root, '.output/server/index.mjs')
  if (!existsSync(entry)) {
    say('no build found: building (about 15 s)…')
    const built = spawnSync(bin('nuxt'), ['build'], { cwd: root, stdio: 'inherit', env: process.env })
    if (built.status !== 0) throw new Error('the build failed')
  }
  const served = serveWorkers({ entry, env, workers, log: say })
  let exiting = false
  const shutDown = async (code, signal) => {
    if (exiting) return
    exiting = true
    await served.stop(signal)
    await closeFakes()
    process.exit(code)
  }
  for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => shutDown(0, 'SIGTERM'))
  served.stopped.then(({ failed }) => shutDown(failed ? 1 : 0, 'SIGTERM'))
  // The built server keeps running even when it cannot listen: check that it does.
  const deadline = Date.now() + 30_000
  while (!(await portAnswers(host, port))) {
    if (Date.now() > deadline) {
      say(`the app did not start listening on ${host}:${port}`)
      return shutDown(1, 'SIGTERM')
    }
    await new Promise(r => setTimeout(r, 200))
  }
  say(`Rillbook is ready on http://${host}:${port} with ${workers} worker${workers === 1 ? '' : 's'} (Ctrl-C stops it; npm run db:stop stops the database)`)
}

main().catch((err) => {
  say(err.message)
  process.exit(1)
})
