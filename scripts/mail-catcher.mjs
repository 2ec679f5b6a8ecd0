#!/usr/bin/env node
// A local SMTP catcher for `npm start` and the tests: accepts every message on 127.0.0.1 (no TLS,
// no authentication) and stores each one as a JSON file in a directory, where the dev mailbox
// page (/dev/mailbox) and the tests read it. Nothing is ever relayed.
//   node scripts/mail-catcher.mjs --port 2525 --dir .data/mail
// Defaults come from RILLBOOK_SMTP_PORT (2525) and RILLBOOK_MAIL_DIR (.data/mail). As a command it
// writes its pid to <dir>/catcher.pid and stops on SIGTERM/SIGINT.
import { randomBytes } from 'node:crypto'
import { mkdirSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { argValue, isMain, runUntilStopped, writeAtomic } from './lib/local-service.mjs'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'

const HOST = '127.0.0.1'

/** Sortable, file-name-safe id: time first so the newest sorts last. Matches /^[\w-]+$/. */
function messageFileId(at) {
  return `${at.getTime().toString().padStart(15, '0')}-${randomBytes(4).toString('hex')}`
}

function addressList(value) {
  if (!value) return []
  const groups = Array.isArray(value) ? value : [value]
  return groups.flatMap(g => g.value ?? []).map(a => a.address).filter(Boolean)
}

/**
 * Starts catching on 127.0.0.1:`port` and storing messages in `dir`.
 * @param {{ port: number, dir: string, log?: (msg: string) => void }} opts
 * @returns {Promise<{ close(): Promise<void>, port: number, dir: string }>}
 */
export function startMailCatcher({ port, dir, log = msg => process.stdout.write(`${msg}\n`) }) {
  const outDir = resolve(dir)
  mkdirSync(outDir, { recursive: true })

  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    banner: 'local mail catcher (nothing is relayed)',
    size: 25 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const envelopeTo = (session.envelope.rcptTo ?? []).map(r => r.address)
          // One clock reading for both, so the file order and the times shown always agree.
          const at = new Date()
          const id = messageFileId(at)
          const record = {
            id,
            receivedAt: at.toISOString(),
            from: parsed.from?.text ?? session.envelope.mailFrom?.address ?? '',
            to: envelopeTo.length ? envelopeTo : addressList(parsed.to),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            messageId: parsed.messageId ?? null,
            attachments: (parsed.attachments ?? []).map(a => ({
              filename: a.filename ?? null,
              contentType: a.contentType,
              cid: a.cid ?? null,
              size: a.size ?? a.content?.length ?? 0,
              content: a.content ? Buffer.from(a.content).toString('base64') : '',
            })),
          }
          // Written before the SMTP reply, so a sender that got "250" finds the file already.
          writeAtomic(join(outDir, `${id}.json`), JSON.stringify(record, null, 2))
          log(`[mail] caught "${record.subject}" for ${record.to.join(', ')}`)
          callback()
        })
        .catch((err) => {
          log(`[mail] could not read a message: ${err.message}`)
          callback(err)
        })
    },
  })

  return new Promise((resolvePromise, reject) => {
    const onError = (err) => {
      server.removeListener('error', onError)
      reject(err.code === 'EADDRINUSE' ? new Error(`${HOST}:${port} is already in use`) : err)
    }
    server.on('error', onError)
    server.listen(port, HOST, () => {
      server.removeListener('error', onError)
      server.on('error', err => log(`[mail] ${err.message}`))
      log(`[mail] catching on ${HOST}:${port}`)
      resolvePromise({
        port,
        dir: outDir,
        close: () => new Promise(done => server.close(() => done())),
      })
    })
  })
}

async function main() {
  const port = Number(argValue('--port') ?? process.env.RILLBOOK_SMTP_PORT ?? 2525)
  const dir = resolve(argValue('--dir') ?? process.env.RILLBOOK_MAIL_DIR ?? '.data/mail')
  if (!Number.isInteger(port) || port < 1 || port > 65535) throw new Error(`not a port: ${port}`)
  const catcher = await startMailCatcher({ port, dir })
  runUntilStopped(join(dir, 'catcher.pid'), () => catcher.close())
}

if (isMain(import.meta.url)) {
  main().catch((err) => {
    process.stderr.write(`[mail] ${err.message}\n`)
    process.exit(1)
  })
}
