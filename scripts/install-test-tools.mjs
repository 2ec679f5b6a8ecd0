#!/usr/bin/env node
// Makes sure the Debian packages the tests use are present: Chromium (playwright-core drives it
// in the browser tests) and faketime (CI runs the API tests a second time on another date).
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'

export const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium'
export const FAKETIME = '/usr/bin/faketime'

let updated = false
function aptInstall(pkg, path) {
  if (existsSync(path)) return path
  if (process.getuid?.() !== 0) {
    throw new Error(`${pkg} is not installed at ${path}. Install it with: sudo apt-get install -y ${pkg}`)
  }
  console.error(`[test tools] installing Debian's ${pkg} package (apt-get)…`)
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  if (!updated) execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env })
  updated = true
  execFileSync('apt-get', ['install', '-y', '-qq', pkg], { stdio: 'inherit', env })
  return path
}

export function ensureChromium() {
  return aptInstall('chromium', CHROMIUM)
}

export function ensureFaketime() {
  return aptInstall('faketime', FAKETIME)
}

if (process.argv[1] && import.meta.url.endsWith(process.argv[1].split('/').pop())) {
  try {
    console.log(ensureChromium())
    console.log(ensureFaketime())
  }
  catch (err) {
    console.error(err.message)
    process.exitCode = 1
  }
}
