#!/usr/bin/env node
// Makes sure Debian's Chromium is present for the browser tests (playwright-core drives it).
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'

export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium'

export function ensureChromium() {
  if (existsSync(CHROMIUM)) return CHROMIUM
  if (process.getuid?.() !== 0) {
    throw new Error(`Chromium is not installed at ${CHROMIUM}. Install it with: sudo apt-get install -y chromium (or set CHROMIUM_PATH)`)
  }
  console.error('[browser] installing Debian\'s chromium package (apt-get)…')
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env })
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env })
  return CHROMIUM
}

if (process.argv[1] && import.meta.url.endsWith(process.argv[1].split('/').pop())) {
  try {
    console.log(ensureChromium())
  }
  catch (err) {
    console.error(err.message)
    process.exitCode = 1
  }
}
