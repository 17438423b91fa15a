// The tuning bench's preview round trip as a designer feels it: a real app on its own
// services, a 12 MP phone photo, Debian's Chromium, the curve tolerance changed again and
// again; the bench records, for each answer, the time from the request to the drawn outline.
import { existsSync } from 'node:fs'
import { chromium } from 'playwright-core'
import { benchApp } from './bench-app'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/db/demo'

const PORTS = { app: 3961, pg: 54361, s3: 4591, smtp: 2561 }

async function signIn(base: string, email: string): Promise<string> {
  const r = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) })
  if (!r.ok) throw new Error(`sign-in answered ${r.status}`)
  return r.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
}

export interface RoundTrips { requestMs: number[]; sinceChangeMs: number[]; serverMs: number[] }

export async function benchBrowserRoundTrip(photo: Buffer, changes: number): Promise<RoundTrips | string> {
  if (!existsSync('/usr/bin/chromium')) return 'Debian\'s chromium is not installed (apt-get install chromium): no browser figure.'
  const { stack, base, wrensId, start } = await benchApp('bench', PORTS)
  let app: Awaited<ReturnType<typeof start>> | undefined
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'] })
  try {
    app = await start()

    const form = new FormData()
    form.set('file', new Blob([new Uint8Array(photo)], { type: 'image/jpeg' }), 'bench-photo.jpg')
    form.set('title', 'Benchmark photo')
    form.set('teamId', String(wrensId))
    form.set('widthMm', '150')
    const up = await fetch(`${base}/api/artworks`, { method: 'POST', body: form, headers: { cookie: await signIn(base, DEMO_ACCOUNTS.student.email) } })
    if (up.status !== 201) throw new Error(`upload answered ${up.status}: ${await up.text()}`)
    const artworkId = ((await up.json()) as { artwork: { id: number } }).artwork.id

    const context = await browser.newContext({ viewport: { width: 1280, height: 1000 } })
    const cookie = await signIn(base, DEMO_ACCOUNTS.designer.email)
    await context.addCookies(cookie.split('; ').map((c) => { const i = c.indexOf('='); return { name: c.slice(0, i), value: c.slice(i + 1), url: base } }))
    const page = await context.newPage()
    await page.goto(`${base}/artworks/${artworkId}/bench`, { waitUntil: 'networkidle' })
    const status = page.locator('[data-test="preview-status"]')
    const waitForNext = async (before: number) => page.waitForFunction((n) => {
      const el = document.querySelector('[data-test="preview-status"]')
      return !!el && Number(el.getAttribute('data-previews')) > n && el.getAttribute('data-pending') === 'false'
    }, before, { timeout: 30_000 })
    for (let i = 0; i <= changes; i++) {
      const before = Number(await status.getAttribute('data-previews'))
      const box = page.locator('[data-test="curveTolerance-input"]')
      await box.fill((0.2 + ((i % 6) + 1) * 0.05).toFixed(2))
      await box.press('Enter')
      await waitForNext(before)
    }
    // The first answer includes starting the worker and shrinking the source: leave it out.
    const trips = (JSON.parse((await status.getAttribute('data-round-trips')) ?? '[]') as { requestMs: number; sinceChangeMs: number; serverMs: number }[]).slice(1)
    return { requestMs: trips.map((t) => t.requestMs), sinceChangeMs: trips.map((t) => t.sinceChangeMs), serverMs: trips.map((t) => t.serverMs) }
  } finally {
    await browser.close()
    await app?.stop()
    await stack.stop()
  }
}
