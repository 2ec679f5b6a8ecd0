import { inject } from 'vitest'

export const DEMO_PASSWORD = 'demo-pond-2026'
export const demo = {
  owner: 'mara@heronmere.example',
  tess: 'tess@heronmere.example',
  dario: 'dario@heronmere.example',
  priya: 'priya@whitcombe.example',
  ashgrove: 'office@ashgrove.example',
} as const

export function baseUrl() {
  return inject('baseUrl')
}

export interface ApiResponse<T = any> { status: number, body: T, headers: Headers }

/** One HTTP call to the test server (or the server at `base`) with JSON in and out. */
export async function api<T = any>(path: string, opts: { method?: string, token?: string, body?: unknown, headers?: Record<string, string>, base?: string } = {}): Promise<ApiResponse<T>> {
  const headers: Record<string, string> = { accept: 'application/json', ...opts.headers }
  if (opts.token) headers.authorization = `Bearer ${opts.token}`
  if (opts.body !== undefined) headers['content-type'] = 'application/json'
  const res = await fetch(`${opts.base ?? baseUrl()}${path}`, {
    method: opts.method ?? 'GET',
    headers,
    body: opts.body === undefined ? undefined : typeof opts.body === 'string' ? opts.body : JSON.stringify(opts.body),
    redirect: 'manual',
  })
  const text = await res.text()
  let body: any = text
  try {
    body = JSON.parse(text)
  }
  catch {}
  return { status: res.status, body, headers: res.headers }
}

const tokens = new Map<string, string>()

/** Signs in (once per e-mail per file) and returns the bearer token. */
export async function tokenFor(email: string, password = DEMO_PASSWORD) {
  const cached = tokens.get(email)
  if (cached) return cached
  const r = await api<{ token: string }>('/api/auth/login', { method: 'POST', body: { email, password } })
  if (r.status !== 200) throw new Error(`sign-in as ${email} failed: ${r.status} ${JSON.stringify(r.body)}`)
  tokens.set(email, r.body.token)
  return r.body.token
}

export function uniqueEmail(prefix: string) {
  return `${prefix}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 7)}@test.example`
}
