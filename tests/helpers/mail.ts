import { spawn } from 'node:child_process'
import { readdirSync, readFileSync, writeFileSync } from 'node:fs'
import net from 'node:net'
import { resolve } from 'node:path'
import { inject } from 'vitest'

const root = resolve(import.meta.dirname, '../..')

/** One message as the catcher (scripts/mail-catcher.mjs) stored it. */
export interface CaughtMessage {
  id: string
  receivedAt: string
  from: string
  to: string[]
  subject: string
  text: string
  html: string
  messageId: string | null
  attachments: Array<{ filename: string | null, contentType: string, cid: string | null, size: number, content: string }>
}

function mailDir() {
  return inject('mailDir')
}

const pidFile = () => resolve(mailDir(), 'catcher.pid')

/** Every message the test catcher holds, oldest first. */
export function caughtMail(): CaughtMessage[] {
  let names: string[] = []
  try {
    names = readdirSync(mailDir())
  }
  catch {}
  return names.filter(n => /^[\w-]+\.json$/.test(n)).sort()
    .map(n => JSON.parse(readFileSync(resolve(mailDir(), n), 'utf8')) as CaughtMessage)
}

/** Polls the mailbox until a message matches; returns the first match. */
export async function waitForMail(predicate: (m: CaughtMessage) => boolean, timeoutMs = 15_000): Promise<CaughtMessage> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const hit = caughtMail().find(predicate)
    if (hit) return hit
    if (Date.now() > deadline) throw new Error(`no matching mail within ${timeoutMs} ms (${caughtMail().length} caught)`)
    await new Promise(r => setTimeout(r, 150))
  }
}

/** Message-ID the outbox gives a row (see server/services/mail.ts). */
export function outboxMessageId(outboxId: string) {
  return `<${outboxId}@rillbook>`
}

function portAnswers(port: number) {
  return new Promise<boolean>((done) => {
    const s = net.connect({ host: '127.0.0.1', port })
    s.once('connect', () => { s.destroy(); done(true) })
    s.once('error', () => done(false))
  })
}

async function waitForPort(open: boolean, timeoutMs = 15_000) {
  const port = inject('smtpPort')
  const deadline = Date.now() + timeoutMs
  while (await portAnswers(port) !== open) {
    if (Date.now() > deadline) throw new Error(`127.0.0.1:${port} ${open ? 'never answered' : 'still answers'}`)
    await new Promise(r => setTimeout(r, 100))
  }
}

export function catcherRunning() {
  return portAnswers(inject('smtpPort'))
}

/** Stops the catcher whose pid is in the pid file and waits until its port refuses connections. */
export async function stopCatcher() {
  const pid = Number(readFileSync(pidFile(), 'utf8').trim())
  try {
    process.kill(pid, 'SIGTERM')
  }
  catch {}
  await waitForPort(false)
}

/**
 * Starts a new catcher on the same port and directory, detached from this test worker so it
 * outlives it; its pid goes into the same pid file, which the global teardown kills.
 */
export async function startCatcher() {
  if (await catcherRunning()) return
  const child = spawn(process.execPath, [resolve(root, 'scripts/mail-catcher.mjs'), '--port', String(inject('smtpPort')), '--dir', mailDir()], {
    cwd: root,
    detached: true,
    stdio: 'ignore',
  })
  child.unref()
  // The catcher writes the pid file itself once it listens; write it now as well so teardown
  // finds it even if this worker stops before the catcher is up.
  writeFileSync(pidFile(), String(child.pid))
  await waitForPort(true)
}
