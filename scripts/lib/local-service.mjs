// Shared by the local stand-ins for outside services (mail catcher, payment fake): atomic file
// writes, command-line values, and running one as a command with a pid file and a clean stop.
import { randomBytes } from 'node:crypto'
import { readFileSync, renameSync, unlinkSync, writeFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { fileURLToPath } from 'node:url'

/** Writes the file under a temporary name first, so a reader never sees half of it. */
export function writeAtomic(path, text) {
  const tmp = `${path}.tmp-${randomBytes(3).toString('hex')}`
  writeFileSync(tmp, text)
  renameSync(tmp, path)
}

/** The value after `name` on the command line (`--port 2525` → "2525"). */
export function argValue(name) {
  const i = process.argv.indexOf(name)
  return i > -1 ? process.argv[i + 1] : undefined
}

/** True when the module at `url` is the script node was started with. */
export function isMain(url) {
  return Boolean(process.argv[1]) && resolve(process.argv[1]) === fileURLToPath(url)
}

/**
 * Keeps a started service running as a command: writes its pid to `pidFile`, and on SIGTERM or
 * SIGINT removes the pid file (when it is still ours) and closes the service, giving it two
 * seconds (a client that never hangs up must not hold the stop).
 */
export function runUntilStopped(pidFile, close) {
  writeAtomic(pidFile, String(process.pid))
  let stopping = false
  const stop = async () => {
    if (stopping) return
    stopping = true
    try {
      if (readFileSync(pidFile, 'utf8').trim() === String(process.pid)) unlinkSync(pidFile)
    }
    catch {}
    setTimeout(() => process.exit(0), 2000).unref()
    await close()
    process.exit(0)
  }
  process.on('SIGTERM', stop)
  process.on('SIGINT', stop)
}
