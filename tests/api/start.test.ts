// `npm start` as a service manager runs it: a crash of the app is met by starting the app
// again (the database and the fakes stay up), and SIGTERM to npm stops the whole stack,
// leaving nothing listening.
import { spawn, spawnSync } from 'node:child_process'
import net from 'node:net'
import path from 'node:path'
import { rmSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { sparePort } from '../support/extra-app'
import { ApiClient } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/db/demo'

function listening(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect(port, '127.0.0.1')
    s.once('connect', () => { s.destroy(); resolve(true) })
    s.once('error', () => resolve(false))
  })
}

async function until(what: string, check: () => Promise<boolean> | boolean, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 250))
  }
}

async function health(port: number): Promise<number> {
  try {
    return (await fetch(`http://127.0.0.1:${port}/api/health`, { signal: AbortSignal.timeout(3000) })).status
  } catch {
    return 0
  }
}

/** Every process below `pid`, by walking the parent links in /proc (through ps). */
function descendants(pid: number): { pid: number; command: string }[] {
  const rows = spawnSync('ps', ['-eo', 'pid=,ppid=,args='], { encoding: 'utf8' }).stdout.trim().split('\n').map((l) => {
    const m = l.trim().match(/^(\d+)\s+(\d+)\s+(.*)$/)!
    return { pid: Number(m[1]), ppid: Number(m[2]), command: m[3]! }
  })
  const found: { pid: number; command: string }[] = []
  const walk = (p: number) => {
    for (const r of rows) if (r.ppid === p) { found.push(r); walk(r.pid) }
  }
  walk(pid)
  return found
}

describe('npm start', () => {
  it('starts the app again after a crash, and stops everything on SIGTERM', async () => {
    const ports = { app: await sparePort(), pg: await sparePort(), s3: await sparePort(), smtp: await sparePort() }
    const storage = path.resolve(`storage/test-start-${process.pid}`)
    rmSync(storage, { recursive: true, force: true })
    const env = Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith('NUXT_')))
    const child = spawn('npm', ['start'], {
      env: {
        ...env, PORT: String(ports.app), DECALWRIGHT_STORAGE: storage, DECALWRIGHT_PG_PORT: String(ports.pg),
        DECALWRIGHT_S3_PORT: String(ports.s3), DECALWRIGHT_SMTP_PORT: String(ports.smtp),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let out = ''
    child.stdout.on('data', (d) => { out += d })
    child.stderr.on('data', (d) => { out += d })
    let exited = false
    child.once('exit', () => { exited = true })
    const say = (what: string) => `${what}; npm start printed:\n${out}`
    try {
      await until(say('the app to answer'), async () => (await health(ports.app)) === 200, 120_000)
      // The start is over once it prints its summary; a crash before that is a failed start, not a crash to recover from.
      await until(say('the start to finish'), async () => out.includes('Press Ctrl-C'), 180_000)
      // A first start loads a season in progress through the app itself: the mentor finds work waiting.
      expect(out).toMatch(/Demo season\s+loaded/)
      const mentor = new ApiClient(`http://127.0.0.1:${ports.app}`)
      await mentor.signIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
      const waiting = (await mentor.get('/api/program/waiting')).body
      expect(waiting).toMatchObject({ toReview: 2, jobsQueued: 2, robotsBare: [] })
      const artworks = (await mentor.get('/api/artworks')).body.items as { status: string }[]
      expect(new Set(artworks.map((a) => a.status))).toEqual(new Set(['draft', 'in-review', 'sent-back', 'approved']))
      const app = descendants(child.pid!).find((p) => p.command.includes('server/index.mjs'))
      expect(app, out).toBeTruthy()
      process.kill(app!.pid, 'SIGKILL')
      await until(say('the app to be gone'), async () => (await health(ports.app)) !== 200, 10_000)
      await until(say('the app to answer again'), async () => (await health(ports.app)) === 200, 60_000)
      expect(exited).toBe(false)
      expect(out).toMatch(/starting it again/)

      const stack = descendants(child.pid!)
      child.kill('SIGTERM')
      await until(say('npm start to end'), () => exited, 60_000)
      for (const [name, port] of Object.entries(ports)) expect(await listening(port), `${name} on ${port}`).toBe(false)
      // Helpers of the TypeScript runner end when their parent's pipe closes, a moment after it.
      const alive = () => stack.filter((p) => { try { process.kill(p.pid, 0); return true } catch { return false } })
      await until('every process of the stack to end', () => alive().length === 0, 10_000).catch(() => undefined)
      expect(alive(), 'processes left running').toEqual([])
    } finally {
      if (!exited) {
        for (const p of descendants(child.pid!)) try { process.kill(p.pid, 'SIGKILL') } catch { /* gone */ }
        child.kill('SIGKILL')
      }
      rmSync(storage, { recursive: true, force: true })
    }
  }, 400_000)
})
