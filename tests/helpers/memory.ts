// The test server's resident memory, read from /proc (the global setup provides its pid), and a
// client that streams a chunked body (no Content-Length) until the server answers.
import { once } from 'node:events'
import { readFileSync, writeFileSync } from 'node:fs'
import http from 'node:http'
import { inject } from 'vitest'
import { baseUrl } from './api'

function statusKb(field: 'VmRSS' | 'VmHWM') {
  const status = readFileSync(`/proc/${inject('serverPid')}/status`, 'utf8')
  const kb = Number(new RegExp(`${field}:\\s+(\\d+)\\s+kB`).exec(status)?.[1])
  if (!Number.isFinite(kb)) throw new Error(`no ${field} for the test server`)
  return kb
}

/** The server's resident set size now, in MB. */
export function serverRssMb() {
  return statusKb('VmRSS') / 1024
}

/**
 * Runs `work` and returns how far the server's resident memory rose above where it started, in
 * MB: the kernel's peak (VmHWM, reset first through clear_refs) when it can be reset, and
 * samples every 20 ms otherwise.
 */
export async function rssGrowthDuring<T>(work: () => Promise<T>): Promise<{ result: T, beforeMb: number, peakMb: number, growthMb: number }> {
  const beforeMb = serverRssMb()
  let kernelPeak = true
  try {
    writeFileSync(`/proc/${inject('serverPid')}/clear_refs`, '5')
  }
  catch {
    kernelPeak = false
  }
  let sampled = beforeMb
  const timer = setInterval(() => {
    try {
      sampled = Math.max(sampled, serverRssMb())
    }
    catch {}
  }, 20)
  try {
    const result = await work()
    const peakMb = Math.max(sampled, serverRssMb(), kernelPeak ? statusKb('VmHWM') / 1024 : 0)
    return { result, beforeMb, peakMb, growthMb: peakMb - beforeMb }
  }
  finally {
    clearInterval(timer)
  }
}

export interface StreamedAnswer { status: number, body: any, sentBytes: number }

/**
 * POSTs `prefix`, then `filler` repeated up to `totalBytes`, as a chunked body (no
 * Content-Length), and stops sending as soon as the server answers.
 */
export function postChunked(path: string, opts: { headers: Record<string, string>, totalBytes: number, prefix?: Buffer, filler?: Buffer }): Promise<StreamedAnswer> {
  const filler = opts.filler ?? Buffer.alloc(1024 * 1024, 0x61)
  const url = new URL(path, baseUrl())
  return new Promise<StreamedAnswer>((resolve, reject) => {
    let answered = false
    let sentBytes = 0
    const req = http.request(url, { method: 'POST', headers: { ...opts.headers, 'transfer-encoding': 'chunked' } })
    req.on('response', (res) => {
      answered = true
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('error', () => {})
      res.on('end', () => {
        const text = Buffer.concat(chunks).toString('utf8')
        let body: any = text
        try {
          body = JSON.parse(text)
        }
        catch {}
        resolve({ status: res.statusCode!, body, sentBytes })
        req.destroy()
      })
    })
    req.on('error', (err) => {
      if (!answered) reject(err)
    })
    const stopped = new Promise<void>((done) => {
      req.once('response', () => done())
      req.once('close', () => done())
    })
    const pump = async () => {
      if (opts.prefix) {
        req.write(opts.prefix)
        sentBytes += opts.prefix.length
      }
      while (!answered && sentBytes < opts.totalBytes && !req.destroyed) {
        const ok = req.write(filler)
        sentBytes += filler.length
        if (!ok) await Promise.race([once(req, 'drain'), stopped])
      }
      if (!answered && !req.destroyed) req.end()
    }
    pump().catch(() => {})
  })
}
