import { spawn, type ChildProcess } from 'node:child_process'
import { SERVER_ENTRY } from './build'

export interface AppProcess { child: ChildProcess; url: string; stop: () => Promise<void> }

/** Starts the built server and waits until it answers its health check. */
export async function startApp(o: { port: number; host: string; env: Record<string, string>; quiet?: boolean }): Promise<AppProcess> {
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
