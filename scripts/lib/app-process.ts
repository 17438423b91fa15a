import { spawn, type ChildProcess } from 'node:child_process'
import { createServer } from 'node:net'
import { SERVER_ENTRY } from './build'

export interface AppProcess { child: ChildProcess; url: string; stop: () => Promise<void> }

/** Whether nothing listens on host:port now (tried by listening there for a moment). */
export function portIsFree(host: string, port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const probe = createServer()
    probe.once('error', () => resolve(false))
    probe.listen({ port, host, exclusive: true }, () => probe.close(() => resolve(true)))
  })
}

/**
 * Starts the built server and waits until it answers its health check. The port must be free
 * first (a process that is still stopping gets a few seconds): otherwise the health check
 * could be answered by another program, or by an earlier app with other settings.
 */
export async function startApp(o: { port: number; host: string; env: Record<string, string>; quiet?: boolean; portWaitMs?: number }): Promise<AppProcess> {
  const freeBy = Date.now() + (o.portWaitMs ?? 15_000)
  while (!(await portIsFree(o.host, o.port))) {
    if (Date.now() > freeBy) throw new Error(`Port ${o.port} on ${o.host} is in use by another program: stop it, or choose another port.`)
    await new Promise((r) => setTimeout(r, 250))
  }
  const child = spawn(process.execPath, [SERVER_ENTRY], {
    env: { ...process.env, ...o.env, PORT: String(o.port), HOST: o.host, NITRO_PORT: String(o.port), NITRO_HOST: o.host },
    stdio: o.quiet ? ['ignore', 'pipe', 'pipe'] : 'inherit',
  })
  const logs: string[] = []
  child.stdout?.on('data', (d) => logs.push(String(d)))
  child.stderr?.on('data', (d) => logs.push(String(d)))
  let exited = false
  child.once('exit', () => { exited = true })
  const url = `http://${o.host}:${o.port}`
  const deadline = Date.now() + 60_000
  for (;;) {
    if (exited) throw new Error(`The app stopped while starting:\n${logs.join('')}`)
    try {
      const r = await fetch(`${url}/api/health`)
      if (r.ok) break
    } catch { /* not listening yet */ }
    if (Date.now() > deadline) throw new Error(`The app did not answer within 60 s:\n${logs.join('')}`)
    await new Promise((r) => setTimeout(r, 250))
  }
  return {
    child, url,
    stop: () => new Promise<void>((resolve) => {
      if (exited) return resolve()
      child.once('exit', () => resolve())
      child.kill('SIGTERM')
      setTimeout(() => { if (!exited) child.kill('SIGKILL') }, 10_000).unref()
    }),
  }
}
