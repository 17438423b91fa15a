// Another app process beside the one the test run started: same build, same database and
// object store unless told otherwise, its own port and settings. For tests of what one
// process must survive (a stalled service, a mail server that is down, a proxy in front).
import { inject } from 'vitest'
import { startApp, type AppProcess } from '../../scripts/lib/app-process'

let used = 0
/** A loopback port of this test run's spare range (each call a new one). */
export function sparePort(): number {
  return inject('spareTestPort') + used++
}

export async function startExtraApp(env: Record<string, string | undefined>): Promise<AppProcess & { baseUrl: string }> {
  const port = sparePort()
  const baseUrl = `http://127.0.0.1:${port}`
  const merged = { ...inject('appEnv'), NUXT_PUBLIC_BASE_URL: baseUrl, ...env }
  const clean = Object.fromEntries(Object.entries(merged).filter(([, v]) => v !== undefined)) as Record<string, string>
  // startApp spreads process.env first: an unset key must not come back from there.
  for (const [k, v] of Object.entries(env)) if (v === undefined) clean[k] = ''
  const app = await startApp({ port, host: '127.0.0.1', env: clean, quiet: !process.env.DECALWRIGHT_TEST_LOGS })
  return { ...app, baseUrl }
}
