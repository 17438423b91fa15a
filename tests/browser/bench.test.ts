import { describe, expect, it, beforeAll, inject } from 'vitest'
import sharp from 'sharp'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, tabletPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { signedIn } from '../support/client'
import { testDb } from '../support/db'
import { uploadArtwork } from '../support/upload'
import { skewedWithShadow } from '../unit/pipeline/hard-cases'

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
/** A photo of a sheet taken at an angle, its drawing 25 mm wide: its 3 mm strokes become 0.6 mm. */
let skewedId: number

beforeAll(async () => {
  const wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const file = await sharp(Buffer.from(benchDrawingSvg())).png().toBuffer()
  const r = await uploadArtwork(student, { file, title: 'Ring, bar and grey moon', teamId: wrens, fileName: 'moon.png' })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  artworkId = r.body.artwork.id
  const skewed = await uploadArtwork(student, { file: (await skewedWithShadow()).source, title: 'Gear and bolt, photographed', teamId: wrens, widthMm: 25, fileName: 'gear.jpg' })
  expect(skewed.status, JSON.stringify(skewed.body)).toBe(201)
  skewedId = skewed.body.artwork.id
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
    // Wheel over one panel and drag in another: all three follow. The prepared bitmap and the
    // outline show the same picture (the trimmed decal) at the same scale; the source, its own.
    const stageScale = (name: string) => page.locator(`[data-test="panel-${name}"] > div`).first().evaluate((el) => /scale\(([\d.]+)\)/.exec((el as HTMLElement).style.transform)?.[1])
    const stageMove = (name: string) => page.locator(`[data-test="panel-${name}"] > div`).first().evaluate((el) => (el as HTMLElement).style.transform)
    const outlinePanel = page.locator('[data-test="panel-outline"]')
    await outlinePanel.scrollIntoViewIfNeeded()
    const sourceBefore = await stageScale('source')
    await outlinePanel.hover()
    await page.mouse.wheel(0, -300)
    await expect.poll(() => page.locator('[data-test="zoom-level"]').textContent()).not.toContain('100 %')
    const scales = await Promise.all(['prepared', 'outline'].map(stageScale))
    expect(new Set(scales).size, scales.join(', ')).toBe(1)
    expect(Number(await stageScale('source'))).toBeGreaterThan(Number(sourceBefore))
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
    // The decal is the drawing: 320 mm of ink across, the height following its proportions.
    expect(await page.locator('[data-test="decal-size"]').textContent()).toMatch(/320 × \d+(\.\d)? mm/)
    await page.locator('[data-test="warning-too-wide"] button').click()
    await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe('widthMm-box')
    await afterPreview(page, async () => { await width.fill('150'); await width.press('Enter') })
    expect(await page.locator('[data-test="warning-too-wide"]').count()).toBe(0)

    // A crop dragged on the source, in source pixels; the decal's height follows the part of the
    // drawing kept; then cleared again.
    const heightBefore = await page.locator('[data-test="decal-size"]').textContent()
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
    await expect.poll(() => page.locator('[data-test="decal-size"]').textContent()).not.toBe(heightBefore)
    expect(Number(await page.locator('[data-test="crop-width"]').inputValue())).toBe(Number(m![1]))
    await afterPreview(page, () => page.locator('[data-test="clear-crop"]').click())
    expect(await page.locator('[data-test="crop-summary"]').textContent()).toContain('The whole source')
    await expect.poll(() => page.locator('[data-test="decal-size"]').textContent()).toBe(heightBefore)

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

    // Until saved, the figures are the preview's estimates; once saved, the revision's own.
    expect(await page.locator('[data-test="figures-kind"]').getAttribute('data-kind')).toBe('estimate')

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
    expect(await page.locator('[data-test="figures-kind"]').getAttribute('data-kind')).toBe('saved')
    expect(await page.locator('[data-test="figures-kind"]').textContent()).toMatch(/The figures of revision 2, as saved/)

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

  it('a designer keeps a clean-up choice, moves the sheet\'s corners three ways, turns the photo and thickens from the warning', { timeout: 180_000 }, async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.goto(new URL(`/artworks/${skewedId}/bench`, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    await page.waitForFunction(() => Number(document.querySelector('[data-test="preview-status"]')?.getAttribute('data-previews')) >= 1, undefined, { timeout: 30_000 })

    // Every choice with its reason; the sheet was found at an angle, its corners drawn dashed.
    const choice = (s: string) => page.locator(`[data-test="choice-${s}"]`)
    expect(await page.locator('[data-test^="choice-"][data-automatic]').count()).toBe(8)
    expect(await choice('corners').getAttribute('data-automatic')).toBe('true')
    expect(await choice('corners').locator('[data-test="choice-reason"]').textContent()).toMatch(/photographed at an angle/)
    expect(await page.locator('[data-test="corners"]').getAttribute('data-source')).toBe('found')
    await page.locator('[data-test="panel-source"]').scrollIntoViewIfNeeded()
    await screenshot(page, 'bench-corners-found')

    // Keep the lighting choice as it is: written into the settings, now "set on the bench".
    const lighting = await choice('lightingEvening').locator('[data-test="choice-select-lightingEvening"]').inputValue()
    expect(lighting).toBe('auto')
    await afterPreview(page, () => choice('lightingEvening').locator('[data-test="choice-keep-lightingEvening"]').click())
    expect(await choice('lightingEvening').getAttribute('data-automatic')).toBe('false')
    expect(await choice('lightingEvening').locator('[data-test="choice-reason"]').textContent()).toMatch(/as set\.$/)
    expect(['on', 'off']).toContain(await page.locator('[data-test="choice-select-lightingEvening"]').inputValue())
    // … and override another: the ruled or grid lines kept.
    await afterPreview(page, () => page.locator('[data-test="choice-select-paperLines"]').selectOption('keep'))
    expect(await choice('paperLines').getAttribute('data-automatic')).toBe('false')

    // Corners: each handle a target of at least 24 × 24 px (WCAG 2.2, 2.5.8).
    const corner = (i: number) => page.locator(`[data-test="corner-${i}"]`)
    await page.locator('[data-test="panel-source"]').evaluate((el) => el.scrollIntoView({ block: 'center' }))
    for (let i = 0; i < 4; i++) {
      const b = (await corner(i).boundingBox())!
      expect(Math.min(b.width, b.height)).toBeGreaterThanOrEqual(24)
    }
    const at = async (i: number) => ({ x: Number(await corner(i).getAttribute('data-x')), y: Number(await corner(i).getAttribute('data-y')) })
    // 1. Dragged: the bottom right corner 30 screen pixels left; the corners become the bench's own.
    const start = await at(2)
    const hb = (await corner(2).boundingBox())!
    await afterPreview(page, async () => {
      await page.mouse.move(hb.x + hb.width / 2, hb.y + hb.height / 2)
      await page.mouse.down()
      await page.mouse.move(hb.x + hb.width / 2 - 15, hb.y + hb.height / 2, { steps: 3 })
      await page.mouse.move(hb.x + hb.width / 2 - 30, hb.y + hb.height / 2, { steps: 3 })
      await page.mouse.up()
    })
    expect(await page.locator('[data-test="corners"]').getAttribute('data-source')).toBe('set')
    const dragged = await at(2)
    expect(dragged.x).toBeLessThan(start.x - 20)
    expect(Math.abs(dragged.y - start.y)).toBeLessThan(3)
    expect(await choice('corners').getAttribute('data-automatic')).toBe('false')
    // 2. The keyboard: three presses right move it three source pixels; Shift + up a fiftieth of
    // the photo's long side (1400 px: 28 px).
    await afterPreview(page, async () => {
      await corner(2).focus()
      for (let i = 0; i < 3; i++) await page.keyboard.press('ArrowRight')
      await page.keyboard.press('Shift+ArrowUp')
    })
    const keyed = await at(2)
    expect(keyed.x).toBeCloseTo(dragged.x + 3, 5)
    expect(keyed.y).toBeCloseTo(dragged.y - 28, 5)
    expect(await page.locator('[data-test="corner-status"]').textContent()).toMatch(/Moved the bottom right corner/)
    // 3. A single pointer, no dragging: press the handle, then click where it goes.
    await page.locator('[data-test="panel-source"]').evaluate((el) => el.scrollIntoView({ block: 'center' }))
    const cb = (await corner(2).boundingBox())!
    await corner(2).click()
    expect(await corner(2).getAttribute('aria-pressed')).toBe('true')
    const target = page.locator('[data-test="corner-target"]')
    const tb = (await target.boundingBox())!
    // 20 screen pixels right of and below where the handle is now
    await afterPreview(page, () => target.click({ position: { x: cb.x - tb.x + cb.width / 2 + 20, y: cb.y - tb.y + cb.height / 2 + 20 } }))
    const clicked = await at(2)
    expect(clicked.x).toBeGreaterThan(keyed.x)
    expect(clicked.y).toBeGreaterThan(keyed.y)
    expect(await corner(2).getAttribute('aria-pressed')).toBe('false')
    // Back to the corners the clean-up finds.
    await afterPreview(page, () => page.locator('[data-test="choice-select-corners"]').selectOption('auto'))
    expect(await page.locator('[data-test="corners"]').getAttribute('data-source')).toBe('found')

    // A quarter turn: the decal stands on its side (the drawing stays 25 mm wide).
    const size = async () => (await page.locator('[data-test="decal-size"]').textContent())!.match(/([\d.]+) × ([\d.]+) mm/)!.slice(1).map(Number)
    const [w0, h0] = await size()
    expect(w0).toBe(25)
    expect(h0!).toBeLessThan(25)
    await afterPreview(page, () => page.locator('[data-test="turn-right"]').click())
    expect(await page.locator('[data-test="turned"]').textContent()).toBe('Turned a quarter clockwise')
    await expect.poll(async () => (await size())[1]!).toBeGreaterThan(25)

    // The narrowest stroke is too thin for film; one click thickens it to 0.8 mm (no film chosen).
    const warning = page.locator('[data-test="warning-thin-stroke"]')
    await expect.poll(() => warning.count()).toBe(1)
    const fix = warning.locator('[data-test="warning-one-click"]')
    expect(await fix.textContent()).toContain('Thicken to 0.8 mm')
    await warning.scrollIntoViewIfNeeded()
    await screenshot(page, 'bench-thin-stroke-warning')
    await afterPreview(page, () => fix.click())
    expect(await page.locator('[data-test="thicken-toggle"]').isChecked()).toBe(true)
    expect(await page.locator('[data-test="thickenToMm-input"]').inputValue()).toBe('0.8')
    expect(await choice('thickenToMm').locator('[data-test="choice-value"]').textContent()).toContain('Thickened to 0.8 mm')
    await expect.poll(() => warning.count()).toBe(0)
    expect(Number((await page.locator('[data-test="m-narrowestFeatureMm"]').textContent())!.replace(' mm', ''))).toBeGreaterThanOrEqual(0.8)
    await page.evaluate(() => window.scrollTo(0, 0))
    await screenshot(page, 'bench-cleanup-tablet')

    // Saved: the revision records the choices, and the figures are its own.
    await Promise.all([
      page.waitForResponse((r) => r.url().endsWith(`/api/artworks/${skewedId}/revisions`) && r.status() === 201),
      page.locator('[data-test="save"]').click(),
    ])
    await expect.poll(() => page.locator('[data-test="figures-kind"]').getAttribute('data-kind')).toBe('saved')
    const saved = await page.evaluate(async (id) => (await fetch(`/api/artworks/${id}`)).json(), skewedId)
    const rev = await page.evaluate(async (rid) => (await fetch(`/api/revisions/${rid}`)).json(), saved.revisions[0].id)
    expect(rev.settings).toMatchObject({ quarterTurns: 1, thickenToMm: 0.8, paperLines: 'keep', corners: { mode: 'auto' } })
    expect(rev.choices.find((c: { setting: string }) => c.setting === 'lightingEvening').automatic).toBe(false)
    expect(rev.measurements.narrowestFeatureMm).toBeGreaterThanOrEqual(0.8)

    // The artwork page lists each choice with its reason, and the drawing's width.
    await page.goto(new URL(`/artworks/${skewedId}`, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="drawing-width"]').textContent()).toMatch(/The drawing is 25 mm wide, trimmed to its ink/)
    expect(await page.locator('[data-test^="revision-choice-"]').count()).toBe(8)
    expect(await page.locator('[data-test="revision-choice-thickenToMm"]').textContent()).toMatch(/Thickened to 0\.8 mm/)
    await page.locator('[data-test="revision-choices"]').scrollIntoViewIfNeeded()
    await screenshot(page, 'artwork-choices')
    await page.close()
  })
})
