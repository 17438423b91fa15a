// Every drag on the tuning bench has a way without dragging (WCAG 2.2, success criterion
// 2.5.7) and a way by keyboard (2.1.1): the threshold marker, the crop (drawn, its edges and
// the whole rectangle), the sheet's corners and the view itself. Each is moved here by the
// keyboard and by clicks alone, and the settings and the preview follow.
import { describe, expect, it, beforeAll, inject } from 'vitest'
import type { Locator, Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, tabletPage } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { signedIn } from '../support/client'
import { drawing } from '../support/images'
import { teamId } from '../support/scenario'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

let artworkId: number

beforeAll(async () => {
  const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const r = await uploadArtwork(student, { file: await drawing('png', 1200, 800), title: `Handles without dragging ${Date.now()}`, teamId: await teamId(), widthMm: 120 })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  artworkId = r.body.artwork.id
})

const previews = (page: Page) => page.locator('[data-test="preview-status"]').getAttribute('data-previews').then(Number)

/** Does `action`, then waits for a newer preview than before, with nothing pending. */
async function afterPreview(page: Page, action: () => Promise<unknown>): Promise<void> {
  const before = await previews(page)
  await action()
  await page.waitForFunction((n) => {
    const el = document.querySelector('[data-test="preview-status"]')
    return !!el && Number(el.getAttribute('data-previews')) > n && el.getAttribute('data-pending') === 'false'
  }, before, { timeout: 30_000 })
}

const num = async (l: Locator, attr = 'value') => Number(attr === 'value' ? await l.inputValue() : await l.getAttribute(attr))
const cropField = (page: Page, f: 'x' | 'y' | 'width' | 'height') => num(page.locator(`[data-test="crop-${f}"]`))
const centreOf = (page: Page) => page.locator('[data-test="panel-source"]').evaluate((el) => el.scrollIntoView({ block: 'center' }))

describe('the tuning bench without dragging', () => {
  it('moves the threshold, the crop, its edges, the sheet\'s corners and the view by keys and by clicks alone', { timeout: 240_000 }, async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.goto(new URL(`/artworks/${artworkId}/bench`, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    await page.waitForFunction(() => Number(document.querySelector('[data-test="preview-status"]')?.getAttribute('data-previews')) >= 1, undefined, { timeout: 60_000 })

    // The threshold: Shift with an arrow key is a step of 10, and the marker becomes manual.
    const slider = page.locator('[data-test="threshold-slider"]')
    expect(await slider.getAttribute('aria-label')).toBe('Threshold')
    const auto = await num(slider, 'aria-valuenow')
    const dir = auto > 128 ? 'ArrowLeft' : 'ArrowRight'
    await afterPreview(page, async () => {
      await slider.focus()
      await page.keyboard.press(`Shift+${dir}`)
    })
    expect(await num(slider, 'aria-valuenow')).toBe(auto + (dir === 'ArrowLeft' ? -10 : 10))
    expect(await page.locator('[data-test="threshold-manual"]').isChecked()).toBe(true)
    // … and a click alone puts it where the click is.
    await slider.scrollIntoViewIfNeeded()
    const track = (await slider.boundingBox())!
    await afterPreview(page, () => slider.click({ position: { x: track.width * (60.5 / 256), y: track.height / 2 } }))
    expect(Math.abs(await num(slider, 'aria-valuenow') - 60)).toBeLessThanOrEqual(1)
    await afterPreview(page, () => page.locator('[data-test="threshold-auto"]').check())

    // The crop, drawn with two clicks (one corner, then the opposite one) and no drag.
    await page.locator('[data-test="crop-mode"]').click()
    await centreOf(page)
    const source = page.locator('[data-test="panel-source"]')
    const sb = (await source.boundingBox())!
    await source.click({ position: { x: sb.width * 0.2, y: sb.height * 0.2 } })
    await page.locator('[data-test="crop-anchor"]').waitFor()
    const sizeBefore = await page.locator('[data-test="decal-size"]').textContent()
    await afterPreview(page, () => source.click({ position: { x: sb.width * 0.8, y: sb.height * 0.8 } }))
    const drawn = { x: await cropField(page, 'x'), y: await cropField(page, 'y'), width: await cropField(page, 'width'), height: await cropField(page, 'height') }
    expect(drawn.x).toBeGreaterThan(0)
    expect(drawn.width).toBeGreaterThan(100)
    expect(drawn.width).toBeLessThan(1200)
    expect(await page.locator('[data-test="crop-summary"]').textContent()).toContain(`${drawn.width} × ${drawn.height} px`)
    await expect.poll(() => page.locator('[data-test="decal-size"]').textContent()).not.toBe(sizeBefore)

    // Its handles: targets of at least 24 × 24 px (2.5.8), named, with where they are.
    const handle = (h: string) => page.locator(`[data-test="crop-handle-${h}"]`)
    for (const h of ['left', 'top', 'right', 'bottom', 'whole']) {
      const b = (await handle(h).boundingBox())!
      expect(Math.min(b.width, b.height)).toBeGreaterThanOrEqual(24)
      expect(await handle(h).getAttribute('aria-label')).toMatch(/crop/i)
    }
    // The left edge by keyboard: three presses right are three source pixels, Shift + right a
    // fiftieth of the source's long side (1200 px: 24 px); the right edge stays.
    await afterPreview(page, async () => {
      await handle('left').focus()
      for (let i = 0; i < 3; i++) await page.keyboard.press('ArrowRight')
      await page.keyboard.press('Shift+ArrowRight')
    })
    expect(await cropField(page, 'x')).toBe(drawn.x + 27)
    expect(await cropField(page, 'width')).toBe(drawn.width - 27)
    expect(await page.locator('[data-test="crop-handle-status"]').textContent()).toMatch(/Moved the left edge of the crop at \d+ px/)
    // The whole crop by keyboard: down one pixel, its size kept.
    await afterPreview(page, async () => {
      await handle('whole').focus()
      await page.keyboard.press('ArrowDown')
    })
    expect(await cropField(page, 'y')).toBe(drawn.y + 1)
    expect(await cropField(page, 'height')).toBe(drawn.height)
    // The bottom edge with a single pointer: press it, then click where it goes.
    await centreOf(page)
    const bottomY = drawn.y + 1 + drawn.height
    await handle('bottom').click()
    expect(await handle('bottom').getAttribute('aria-pressed')).toBe('true')
    const target = page.locator('[data-test="crop-handle-target"]')
    const tb = (await target.boundingBox())!
    const hb = (await handle('bottom').boundingBox())!
    await afterPreview(page, () => target.click({ position: { x: hb.x - tb.x + hb.width / 2 + 40, y: hb.y - tb.y + hb.height / 2 - 20 } }))
    const height = await cropField(page, 'height')
    expect(height).toBeLessThan(drawn.height)
    expect(await cropField(page, 'y') + height).toBeLessThan(bottomY)
    expect(await cropField(page, 'x')).toBe(drawn.x + 27)
    expect(await handle('bottom').getAttribute('aria-pressed')).toBe('false')
    await afterPreview(page, () => page.locator('[data-test="clear-crop"]').click())

    // The sheet's corners (placed with a button when the clean-up found none), moved by keyboard and by two clicks.
    const placeCorners = page.locator('[data-test="place-corners"]')
    if (await placeCorners.isVisible()) await afterPreview(page, () => placeCorners.click())
    const corner = (i: number) => page.locator(`[data-test="corner-${i}"]`)
    const at = async (i: number) => ({ x: await num(corner(i), 'data-x'), y: await num(corner(i), 'data-y') })
    const placed = await at(0)
    await afterPreview(page, async () => {
      await corner(0).focus()
      await page.keyboard.press('ArrowDown')
      await page.keyboard.press('Shift+ArrowRight')
    })
    const keyed = await at(0)
    expect(keyed.x).toBeCloseTo(placed.x + 24, 5)
    expect(keyed.y).toBeCloseTo(placed.y + 1, 5)
    expect(await page.locator('[data-test="corner-status"]').textContent()).toMatch(/Moved the top left corner at/)
    await centreOf(page)
    const before = await at(1)
    await corner(1).click()
    const ct = page.locator('[data-test="corner-target"]')
    const ctb = (await ct.boundingBox())!
    const c1 = (await corner(1).boundingBox())!
    await afterPreview(page, () => ct.click({ position: { x: c1.x - ctb.x + c1.width / 2 - 25, y: c1.y - ctb.y + c1.height / 2 + 25 } }))
    const after = await at(1)
    expect(after.x).toBeLessThan(before.x)
    expect(after.y).toBeGreaterThan(before.y)

    // The view: zoomed in, then moved with buttons instead of a drag.
    const stage = source.locator(':scope > div').first()
    await page.locator('[data-test="zoom-in"]').click()
    await page.locator('[data-test="zoom-in"]').click()
    const zoomed = await stage.getAttribute('style')
    await page.locator('[data-test="pan-right"]').click()
    await expect.poll(() => stage.getAttribute('style')).not.toBe(zoomed)
    const panned = await stage.getAttribute('style')
    await page.locator('[data-test="pan-down"]').click()
    await expect.poll(() => stage.getAttribute('style')).not.toBe(panned)
    await page.close()
  })
})
