import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'

const apiDir = resolve(import.meta.dirname, '../../server/api')

export interface RouteFile { key: string, method: string, path: string, file: string }

/** Every route under server/api, read from the file system so none can be missed. */
export function listApiRoutes(dir = apiDir): RouteFile[] {
  const out: RouteFile[] = []
  for (const name of readdirSync(dir)) {
    const full = join(dir, name)
    if (statSync(full).isDirectory()) {
      out.push(...listApiRoutes(full))
      continue
    }
    const m = name.match(/^(.*?)(?:\.(get|post|put|patch|delete))?\.ts$/)
    if (!m) continue
    const method = (m[2] ?? 'all').toUpperCase()
    const rel = relative(apiDir, join(dir, m[1]!)).split('/').filter(s => s !== 'index')
    const path = `/api/${rel.map(s => s.replace(/^\[(.+)\]$/, ':$1')).join('/')}`.replace(/\/$/, '')
    out.push({ key: `${method} ${path}`, method, path, file: relative(resolve(apiDir, '../..'), full) })
  }
  return out
}
