import { describe, expect, it, beforeAll, inject } from 'vitest'
import sharp from 'sharp'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, tabletPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { signedIn } from '../support/client'
import { testDb } from '../support/db'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

/** Grey level of the mid-grey disc: a threshold on either side of it changes the outline. */
const MID_GREY = 110

/**
 * A drawing made of shapes: a black ring and bar on paper, a mid-grey disc, and five specks
 * of about 1.8 mm² at the 150 mm default width (12 px across on a 1200 px source), which the
 * default speck filter (0.5 mm²) keeps and one of 3 mm² drops.
 */
function benchDrawingSvg(): string {
  const grey = MID_GREY.toString(16).padStart(2, '0').repeat(3)
  const specks = [[80, 80], [1120, 90], [90, 720], [1110, 710], [860, 700]]
    .map(([x, y]) => `<circle cx="${x}" cy="${y}" r="6" fill="#1b1b1b"/>`).join('')
  return `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="800">
  <rect width="100%" height="100%" fill="#f4f1ea"/>
  <circle cx="380" cy="400" r="250" fill="#1b1b1b"/>
  <circle cx="380" cy="400" r="120" fill="#f4f1ea"/>
  <rect x="700" y="170" width="90" height="460" fill="#1b1b1b"/>
  <circle cx="980" cy="400" r="110" fill="#${grey}"/>
  ${specks}
</svg>`
}

let artworkId: number

beforeAll(async () => {
  const wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const file = await sharp(Buffer.from(benchDrawingSvg())).png().toBuffer()
  const r = await uploadArtwork(student, { file, title: 'Ring, bar and grey moon', teamId: wrens, fileName: 'moon.png' })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  artworkId = r.body.artwork.id
})

const status = (page: Page) => page.locator('[data-test="preview-status"]')
const previewCount = async (page: Page) => Number(await status(page).getAttribute('data-previews'))

/** Does `action`, then waits until a newer preview than before is drawn and nothing is pending. */
async function afterPreview(page: Page, action: () => Promise<unknown>): Promise<void> {
  const before = await previewCount(page)
  await action()
  try {
    await page.waitForFunction((n) => {
      const el = document.querySelector('[data-test="preview-status"]')
      return !!el && Number(el.getAttribute('data-previews')) > n && el.getAttribute('data-pending') === 'false'
    }, before, { timeout: 20_000 })
  } catch (err) {
    const el = status(page)
    throw new Error(`no new preview (had ${before}, now ${await el.getAttribute('data-previews')}, pending ${await el.getAttribute('data-pending')}): ${await el.textContent()}`, { cause: err })
  }
}

const outlineData = (page: Page) => page.locator('[data-test="outline"] path').evaluateAll((ps) => ps.map((p) => p.getAttribute('d')).join(' '))
const pieces = async (page: Page) => Number((await page.locator('[data-test="m-pieces"]').textContent())?.trim())

function percentile(values: number[], p: number): number {
  const s = [...values].sort((a, b) => a - b)
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)]!
}

describe('the tuning bench', () => {
  it('a designer steers the threshold and speck filter, saves a revision and compares it', { timeout: 180_000 }, async () => {
    const page = await tabletPage('')
    // The preview answers as the browser saw them, in the order they arrived.
    const answers: string[] = []
    page.on('response', async (r) => {
      if (r.request().method() === 'POST' && r.url().endsWith('/preview') && r.status() === 200) {
        try { answers.push((await r.json()).svg) } catch { /* page closed */ }
      }
    })
    await signInThroughForm(page, DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.goto(new URL(`/artworks/${artworkId}/bench`, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })

    // The first preview arrives by itself.
    await page.waitForFunction(() => Number(document.querySelector('[data-test="preview-status"]')?.getAttribute('data-previews')) >= 1, undefined, { timeout: 30_000 })
    await expect.poll(() => page.locator('[data-test="outline"] path').count()).toBeGreaterThan(0)
    expect(await page.locator('[data-test="histogram-bars"]').getAttribute('d')).toMatch(/^M\d/)
    const startPieces = await pieces(page)
    const startOutline = await outlineData(page)
    // The ring, the bar and the five specks at least; the grey disc too when the automatic threshold takes it.
    expect(startPieces).toBeGreaterThanOrEqual(7)

    // Threshold: a click on the drawn histogram puts the marker there and makes it manual …
    const slider = page.locator('[data-test="threshold-slider"]')
    const auto = Number(await slider.getAttribute('aria-valuenow'))
    expect(auto).toBeGreaterThan(27)
    await slider.scrollIntoViewIfNeeded()
    const track = (await slider.boundingBox())!
    await afterPreview(page, () => slider.click({ position: { x: track.width * (200.5 / 256), y: track.height / 2 } }))
    expect(Math.abs(Number(await slider.getAttribute('aria-valuenow')) - 200)).toBeLessThanOrEqual(1)
    await afterPreview(page, () => page.locator('[data-test="threshold-auto"]').check())
    expect(Number(await slider.getAttribute('aria-valuenow'))).toBe(auto)
    expect(await outlineData(page)).toBe(startOutline)

    // … and the keyboard on the histogram's slider moves it: to the other side of the grey disc.
    const target = auto >= MID_GREY ? 70 : 185
    await afterPreview(page, async () => {
      await slider.focus()
      if (target === 70) {
        await page.keyboard.press('Home')
        for (let i = 0; i < 7; i++) await page.keyboard.press('PageUp')
      } else {
        await page.keyboard.press('End')
        for (let i = 0; i < 7; i++) await page.keyboard.press('PageDown')
      }
    })
    expect(await slider.getAttribute('aria-valuenow')).toBe(String(target))
    expect(await page.locator('[data-test="threshold-manual"]').isChecked()).toBe(true)
    const afterThreshold = await outlineData(page)
    expect(afterThreshold).not.toBe(startOutline)
    // The SVG text the server sent changed too, and the page shows the newest answer.
    expect(answers.length).toBeGreaterThanOrEqual(2)
    expect(answers.at(-1)).not.toBe(answers[0])
    expect(answers.at(-1)).toContain(afterThreshold.split(' ')[0]!.slice(0, 40))
    const thresholdPieces = await pieces(page)
    expect(Math.abs(thresholdPieces - startPieces)).toBe(1) // the grey disc came or went

    // Speck filter: 3 mm² drops the five specks.
    await afterPreview(page, async () => {
      const box = page.locator('[data-test="speckFilterMm2-input"]')
      await box.fill('3')
      await box.press('Enter')
    })
    expect(await pieces(page)).toBe(thresholdPieces - 5)
    expect(await page.locator('[data-test="warning-small-pieces"]').count()).toBe(0)

    // Zoom and pan in step; the outline laid over the source.
    await page.locator('[data-test="zoom-in"]').click()
    await expect.poll(() => page.locator('[data-test="zoom-level"]').textContent()).toContain('125 %')
    await page.locator('[data-test="views"]').focus()
    await page.keyboard.press('+')
    await expect.poll(() => page.locator('[data-test="zoom-level"]').textContent()).toContain('156 %')
    await page.keyboard.press('ArrowRight')
    await page.keyboard.press('0')
    await expect.poll(() => page.locator('[data-test="zoom-level"]').textContent()).toContain('100 %')
    // Wheel over one panel and drag in another: all three follow with the same zoom.
    const stageScale = (name: string) => page.locator(`[data-test="panel-${name}"] > div`).first().evaluate((el) => /scale\(([\d.]+)\)/.exec((el as HTMLElement).style.transform)?.[1])
    const stageMove = (name: string) => page.locator(`[data-test="panel-${name}"] > div`).first().evaluate((el) => (el as HTMLElement).style.transform)
    const outlinePanel = page.locator('[data-test="panel-outline"]')
    await outlinePanel.scrollIntoViewIfNeeded()
    await outlinePanel.hover()
    await page.mouse.wheel(0, -300)
    await expect.poll(() => page.locator('[data-test="zoom-level"]').textContent()).not.toContain('100 %')
    const scales = await Promise.all(['source', 'prepared', 'outline'].map(stageScale))
    expect(new Set(scales).size, scales.join(', ')).toBe(1)
    const before = await Promise.all(['source', 'prepared'].map(stageMove))
    const pb = (await page.locator('[data-test="panel-prepared"]').boundingBox())!
    await page.mouse.move(pb.x + pb.width / 2, pb.y + pb.height / 2)
    await page.mouse.down()
    await page.mouse.move(pb.x + pb.width / 2 - 40, pb.y + pb.height / 2 - 20, { steps: 3 })
    await page.mouse.up()
    const after = await Promise.all(['source', 'prepared'].map(stageMove))
    expect(after[0]).not.toBe(before[0])
    expect(after[1]).not.toBe(before[1])
    await page.locator('[data-test="views"]').focus()
    await page.keyboard.press('0')
    await expect.poll(() => page.locator('[data-test="zoom-level"]').textContent()).toContain('100 %')

    await page.locator('[data-test="overlay-toggle"]').check()
    await expect.poll(() => page.locator('[data-test="overlay"] path').count()).toBeGreaterThan(0)

    // Checked against a film from the stock: its sheet and cut time; a width too large for it
    // is warned about, naming the setting, and the warning leads to that setting.
    await page.locator('[data-test="film-select"]').selectOption({ label: 'Matte black polyester film (300 × 200 mm)' })
    await expect.poll(() => page.locator('[data-test="cut-time"]').textContent()).toMatch(/Estimated cut time on Matte black polyester film: \d/)
    const width = page.locator('[data-test="widthMm-input"]')
    await afterPreview(page, async () => { await width.fill('320'); await width.press('Enter') })
    expect(await page.locator('[data-test="warning-too-wide"]').textContent()).toMatch(/320 mm wide, wider than the 300 mm sheet of Matte black polyester film — reduce the width/)
    expect(await page.locator('[data-test="warning-too-tall"]').textContent()).toMatch(/213 mm tall/)
    await page.locator('[data-test="warning-too-wide"] button').click()
    await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe('widthMm-box')
    await afterPreview(page, async () => { await width.fill('150'); await width.press('Enter') })
    expect(await page.locator('[data-test="warning-too-wide"]').count()).toBe(0)

    // A crop dragged on the source, in source pixels; the height follows; then cleared again.
    const heightBefore = await page.locator('[data-test="height-follows"]').textContent()
    await page.locator('[data-test="crop-mode"]').click()
    await page.locator('[data-test="panel-source"]').scrollIntoViewIfNeeded()
    const box = (await page.locator('[data-test="panel-source"]').boundingBox())!
    await afterPreview(page, async () => {
      await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.2)
      await page.mouse.down()
      await page.mouse.move(box.x + box.width * 0.6, box.y + box.height * 0.5, { steps: 4 })
      await page.mouse.move(box.x + box.width * 0.7, box.y + box.height * 0.8, { steps: 4 })
      await page.mouse.up()
    })
    const summary = await page.locator('[data-test="crop-summary"]').textContent()
    const m = /(\d+) × (\d+) px of 1200 × 800/.exec(summary ?? '')
    expect(m, summary ?? '').not.toBeNull()
    // The panel fits the whole source at zoom 1: screen pixels ÷ that scale are source pixels
    // (give or take the panel's border and the rounding outwards to whole pixels).
    const fit = Math.min(box.width / 1200, box.height / 800)
    expect(Math.abs(Number(m![1]) - (0.2 * box.width) / fit)).toBeLessThanOrEqual(8)
    expect(Math.abs(Number(m![2]) - (0.6 * box.height) / fit)).toBeLessThanOrEqual(8)
    expect(await page.locator('[data-test="height-follows"]').textContent()).not.toBe(heightBefore)
    expect(Number(await page.locator('[data-test="crop-width"]').inputValue())).toBe(Number(m![1]))
    await afterPreview(page, () => page.locator('[data-test="clear-crop"]').click())
    expect(await page.locator('[data-test="crop-summary"]').textContent()).toContain('The whole source')
    expect(await page.locator('[data-test="height-follows"]').textContent()).toBe(heightBefore)

    // Round trips: a few more changes, each let go of and drawn.
    for (const v of ['0.25', '0.3', '0.35', '0.4', '0.45', '0.5', '0.3', '0.2']) {
      await afterPreview(page, async () => {
        const box = page.locator('[data-test="curveTolerance-input"]')
        await box.fill(v)
        await box.press('Enter')
      })
    }
    // The first preview includes starting the server's worker; the rest are what a designer feels.
    const trips = (JSON.parse((await status(page).getAttribute('data-round-trips')) ?? '[]') as { requestMs: number; sinceChangeMs: number; serverMs: number }[]).slice(1)
    const req = trips.map((t) => t.requestMs)
    const since = trips.map((t) => t.sinceChangeMs)
    const server = trips.map((t) => t.serverMs)
    console.log(`preview round trip (warm), request → drawn outline, n=${req.length}: median ${percentile(req, 50)} ms, p95 ${percentile(req, 95)} ms; `
      + `let go → drawn: median ${percentile(since, 50)} ms, p95 ${percentile(since, 95)} ms; server pipeline median ${percentile(server, 50)} ms`)

    await page.evaluate(() => window.scrollTo(0, 0))
    await screenshot(page, 'bench-tablet')
    // And on a wider screen the three pictures stand in one row.
    await page.setViewportSize({ width: 1280, height: 900 })
    await expect.poll(async () => {
      const [a, b] = await Promise.all(['source', 'outline'].map(async (n) => (await page.locator(`[data-test="panel-${n}"]`).boundingBox())!.y))
      return Math.abs(a! - b!)
    }).toBeLessThan(2)
    await screenshot(page, 'bench-desktop')
    await page.setViewportSize({ width: 820, height: 1100 })

    // Save: one click; the list grows and the next number moves on.
    const save = page.locator('[data-test="save"]')
    expect(await save.textContent()).toContain('Save as revision 2')
    await Promise.all([
      page.waitForResponse((r) => r.url().endsWith(`/api/artworks/${artworkId}/revisions`) && r.status() === 201),
      save.click(),
    ])
    await expect.poll(() => page.locator('[data-test="revision-item"]').count()).toBe(2)
    await expect.poll(() => page.locator('[data-test="notice"]').textContent()).toContain('Saved as revision 2')
    expect(await page.locator('[data-test="revision-count"]').textContent()).toContain('2 revisions')
    expect(await save.isDisabled()).toBe(true) // nothing new to save until a setting changes
    expect(await save.textContent()).toContain('Save as revision 3')

    // Compare r1 with r2: the changed settings are listed as changed.
    await page.locator('[data-test="compare-link"]').click()
    await page.waitForURL((u) => u.pathname === `/artworks/${artworkId}/compare` && u.searchParams.get('a') === '1' && u.searchParams.get('b') === '2')
    const speckRow = page.locator('[data-test="compare-row"][data-key="speckFilterMm2"]')
    await expect.poll(() => speckRow.count(), { timeout: 15_000 }).toBe(1)
    expect(await speckRow.getAttribute('data-changed')).toBe('true')
    expect(await speckRow.textContent()).toMatch(/Speck filter.*0\.5 mm².*3 mm².*changed/s)
    const thresholdRow = page.locator('[data-test="compare-row"][data-key="threshold"][data-group="setting"]')
    expect(await thresholdRow.textContent()).toContain(`Manual, ${target}`)
    expect(await page.locator('[data-test="compare-row"][data-key="pieces"]').getAttribute('data-changed')).toBe('true')
    await expect.poll(() => page.locator('[data-test="compare-summary"]').textContent(), { timeout: 15_000 }).toMatch(/% of the ink differs between r1 and r2/)
    expect(await page.locator('[data-test="compare-legend"]').textContent()).toMatch(/only in r1.*only in r2.*in both/s)
    await screenshot(page, 'compare-tablet')

    await page.close()
  })
})
