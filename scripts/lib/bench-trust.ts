// `npm run bench`, bodies under load: the built app on its own services, measured from outside
// as a client would feel it.
// - The event loop's longest pause while a legal 24 MB upload arrives and is parsed, stored and
//   outlined: a tight loop of tiny requests (the favicon, no database) runs beside the upload;
//   its slowest answer, less the loop's median when the app is idle, is the longest stretch the
//   app could not answer. The idle loop's own slowest answer is the floor it is compared with.
// - The app process's peak memory (VmHWM, worker threads included) while four such uploads and
//   a chunked 300 MB JSON body arrive together, beside its resident memory when idle.
import http from 'node:http'
import { readFileSync } from 'node:fs'
import { monitorEventLoopDelay, performance } from 'node:perf_hooks'
import sharp from 'sharp'
import type { AppProcess } from './app-process'
import { benchApp } from './bench-app'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/db/demo'

const PORTS = { app: 3963, pg: 54363, s3: 4593, smtp: 2563 }
const MB = 1024 * 1024
const PAUSE_TARGET_MS = 50

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}

/** A drawing saved as an uncompressed PNG of about 24 MB: legal, and a full pipeline run. */
async function bigPng(): Promise<Buffer> {
  // 2900 × 2890 × 3 bytes: 24 MiB, under the 25 MiB limit.
  const w = 2900
  const h = 2890
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}">
    <rect width="100%" height="100%" fill="#f4f1ea"/>
    <g fill="#24211e"><circle cx="${w * 0.35}" cy="${h * 0.45}" r="${h * 0.22}"/>
      <rect x="${w * 0.62}" y="${h * 0.2}" width="${w * 0.08}" height="${h * 0.6}"/></g>
    <circle cx="${w * 0.35}" cy="${h * 0.45}" r="${h * 0.08}" fill="#f4f1ea"/></svg>`
  return sharp(Buffer.from(svg)).removeAlpha().png({ compressionLevel: 0 }).toBuffer()
}

async function signIn(base: string): Promise<string> {
  const r = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: DEMO_ACCOUNTS.student.email, password: DEMO_PASSWORD }) })
  if (!r.ok) throw new Error(`sign-in answered ${r.status}`)
  return r.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
}

interface Upload { status: number; sentAt: number; answeredAt: number }

/** POST /api/artworks as a browser's form would send it, in 64 KB writes; when the last byte was handed over, and when the answer came. */
function upload(base: string, cookie: string, png: Buffer, teamId: number, title: string): Promise<Upload> {
  const boundary = `----dwbench${Math.random().toString(16).slice(2)}`
  const field = (name: string, value: string) => `--${boundary}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`
  const head = Buffer.from(`${field('title', title)}${field('teamId', String(teamId))}--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="bench-24mb.png"\r\nContent-Type: image/png\r\n\r\n`)
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`)
  const body = Buffer.concat([head, png, tail])
  return new Promise((resolve, reject) => {
    let sentAt = 0
    const req = http.request(`${base}/api/artworks`, {
      method: 'POST',
      headers: { cookie, accept: 'application/json', 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': body.byteLength },
    }, (res) => {
      res.resume()
      res.on('end', () => resolve({ status: res.statusCode ?? 0, sentAt, answeredAt: performance.now() }))
    })
    req.on('error', reject)
    let at = 0
    const pump = () => {
      while (at < body.byteLength) {
        const piece = body.subarray(at, at + 64 * 1024)
        at += piece.byteLength
        if (!req.write(piece)) { req.once('drain', pump); return }
      }
      req.end(() => { sentAt = performance.now() })
    }
    pump()
  })
}

/** Tiny requests one after another on one kept-alive connection until `done` resolves: when each was answered, and how long it took, ms. */
async function probe(base: string, done: Promise<unknown>): Promise<{ at: number; ms: number }[]> {
  const agent = new http.Agent({ keepAlive: true, maxSockets: 1 })
  const times: { at: number; ms: number }[] = []
  let finished = false
  const finish = () => { finished = true }
  done.then(finish, finish)
  while (!finished) {
    const t0 = performance.now()
    await new Promise<void>((resolve, reject) => {
      http.get(`${base}/api/event-loop-probe`, { agent }, (res) => { res.resume(); res.on('end', resolve) }).on('error', reject)
    })
    const t1 = performance.now()
    times.push({ at: t1, ms: t1 - t0 })
  }
  agent.destroy()
  return times
}

/** A chunked JSON body of `total` bytes to sign-in, as fast as the app takes it; how much it took before it answered or closed. */
function hugeJson(base: string, total: number): Promise<{ sent: number; answer: string }> {
  return new Promise((resolve) => {
    let sent = 0
    const chunk = Buffer.alloc(256 * 1024, 0x61)
    const req = http.request(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json', 'transfer-encoding': 'chunked' } }, (res) => {
      res.resume()
      res.on('end', () => resolve({ sent, answer: String(res.statusCode) }))
    })
    req.on('error', () => resolve({ sent, answer: 'connection closed' }))
    const pump = () => {
      while (sent < total) {
        sent += chunk.byteLength
        if (!req.write(sent === chunk.byteLength ? Buffer.concat([Buffer.from('{"email":"a@b.example","password":"'), chunk]) : chunk)) { req.once('drain', pump); return }
      }
      req.end('"}')
    }
    pump()
  })
}

function procStatus(pid: number, field: 'VmHWM' | 'VmRSS'): number {
  const line = readFileSync(`/proc/${pid}/status`, 'utf8').split('\n').find((l) => l.startsWith(`${field}:`))
  return Number(line?.match(/(\d+)/)?.[1] ?? 0) * 1024
}

const mb = (n: number) => `${(n / MB).toFixed(0)} MB`

export async function benchTrust(): Promise<void> {
  console.log('\nBodies under load (the built app on its own services, measured from outside):')
  const { stack, base, wrensId, start } = await benchApp('bench-trust', PORTS)
  let app: AppProcess | undefined
  try {
    const png = await bigPng()
    app = await start()
    const cookie = await signIn(base)
    // Warm up: the first upload starts the worker pool and sharp.
    await upload(base, cookie, png, wrensId, 'Warm-up')

    const idle = (await probe(base, new Promise((r) => setTimeout(r, 3000)))).map((x) => x.ms)
    const own = monitorEventLoopDelay({ resolution: 5 })
    own.enable()
    const t0 = performance.now()
    const sending = upload(base, cookie, png, wrensId, 'Bench 24 MB')
    const beside = await probe(base, sending)
    const up = await sending
    own.disable()
    const floor = median(idle)
    // Each tiny request waits for whatever the app was doing: the slowest, less the idle median, is the longest pause.
    const worst = (phase: { ms: number }[]) => Math.max(0, ...phase.map((x) => x.ms)) - floor
    const parsing = beside.filter((x) => x.at <= up.sentAt + 5)
    const after = beside.filter((x) => x.at > up.sentAt + 5)
    console.log(`  a ${mb(png.byteLength)} upload (answered ${up.status}: sent in ${((up.sentAt - t0) / 1000).toFixed(2)} s, answered ${((up.answeredAt - up.sentAt) / 1000).toFixed(2)} s later), tiny requests beside it:`)
    console.log(`    idle: median ${floor.toFixed(1)} ms, slowest ${Math.max(...idle).toFixed(1)} ms (${idle.length} requests in 3 s)`)
    console.log(`    longest event-loop pause while the upload arrives and is parsed ≈ ${worst(parsing).toFixed(1)} ms (target ≤ ${PAUSE_TARGET_MS} ms), ${(Math.max(...parsing.map((x) => x.ms)) / Math.max(...idle)).toFixed(2)}× the idle slowest (${parsing.length} requests)`)
    console.log(`    afterwards, while the picture is decoded, outlined in the worker threads and stored ≈ ${worst(after).toFixed(1)} ms (${after.length} requests; the workers take both cores)`)
    console.log(`    this benchmark's own event loop paused at most ${(own.max / 1e6).toFixed(1)} ms meanwhile`)

    // Memory from a fresh process, so the peak belongs to this burst alone.
    await app.stop()
    app = await start()
    const fresh = await signIn(base)
    await new Promise((r) => setTimeout(r, 1000))
    const idleRss = procStatus(app.child.pid!, 'VmRSS')
    const [uploads, huge] = await Promise.all([
      Promise.all([1, 2, 3, 4].map((i) => upload(base, fresh, png, wrensId, `Burst ${i}`))),
      hugeJson(base, 300 * MB),
    ])
    const peak = procStatus(app.child.pid!, 'VmHWM')
    console.log(`  four ${mb(png.byteLength)} uploads (answered ${uploads.map((u) => u.status).join(', ')}) and a chunked 300 MB JSON body to sign-in (answered ${huge.answer} after ${mb(huge.sent)} sent) together:`)
    console.log(`    the app's peak memory (VmHWM, worker threads included) ${mb(peak)}; ${mb(idleRss)} when idle after start, ${(peak / idleRss).toFixed(2)}× that`)
  } finally {
    await app?.stop()
    await stack.stop()
  }
}
