// Another app process beside the one the test run started: same build, same database and
// object store unless told otherwise, its own port and settings. For tests of what one
// process must survive (a stalled service, a mail server that is down, a proxy in front).
import { inject } from 'vitest'
import { portIsFree, startApp, type AppProcess } from '../../scripts/lib/app-process'

/** How many ports the spare range holds (the next test run's ports start 100 further on). */
const SPARE_PORTS = 60
const given = new Set<number>()

/**
 * A loopback port of this test run's spare range that nothing listens on now and that this
 * file has not been given before. Each test file counts afresh, so a port is checked, not
 * assumed: an app another file started may still be stopping there.
 */
export async function sparePort(): Promise<number> {
  const base = inject('spareTestPort')
  for (let i = 0; i < SPARE_PORTS; i++) {
    const port = base + i
    if (given.has(port) || !(await portIsFree('127.0.0.1', port))) continue
    given.add(port)
    return port
  }
  throw new Error(`No free port in ${base}…${base + SPARE_PORTS - 1}.`)
}

export async function startExtraApp(env: Record<string, string | undefined>): Promise<AppProcess & { baseUrl: string }> {
  const port = await sparePort()
  const baseUrl = `http://127.0.0.1:${port}`
  const merged = { ...inject('appEnv'), NUXT_PUBLIC_BASE_URL: baseUrl, ...env }
  const clean = Object.fromEntries(Object.entries(merged).filter(([, v]) => v !== undefined)) as Record<string, string>
  // startApp spreads process.env first: an unset key must not come back from there.
  for (const [k, v] of Object.entries(env)) if (v === undefined) clean[k] = ''
  const app = await startApp({ port, host: '127.0.0.1', env: clean, quiet: !process.env.DECALWRIGHT_TEST_LOGS })
  return { ...app, baseUrl }
}
