// A coloured drawing in the browser: the upload page says which inks it found, with their
// colours; the artwork page draws every layer stacked in its colour and one layer alone, with
// the measurements of what is shown.
import { describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { screenshot, setupBrowser, signInThroughForm, tabletPage } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { photograph, threeInkDrawing } from '../unit/pipeline/colour/drawing'

await setupBrowser()

const url = (page: Page, path: string) => new URL(path, page.url()).toString()
const title = `Three inks ${Date.now().toString(36)}`
let artworkPath = ''

/** Console errors of a page, except failed loads. */
function consoleErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('console', (m) => { if (m.type() === 'error' && !/Failed to load resource/.test(m.text())) errors.push(m.text()) })
  page.on('pageerror', (e) => errors.push(String(e)))
  return errors
}

/** The fill colours of the groups drawn in the layer view. */
const drawnFills = (page: Page) => page.locator('[data-test="revision-layers"] svg g[id^="dw-layer-"]')
  .evaluateAll((gs) => gs.map((g) => g.getAttribute('fill')))

describe('a coloured drawing in the browser', () => {
  it('uploads: the page names the three inks and shows their colours', async () => {
    const page = await tabletPage('')
    const errors = consoleErrors(page)
    await signInThroughForm(page, DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname !== '/sign-in')
    await page.goto(url(page, '/artworks/new'), { waitUntil: 'networkidle' })
    const form = page.locator('[data-test="upload-form"]')
    await form.locator('input[type="file"][name="file"]').setInputFiles({ name: 'three-inks.jpg', mimeType: 'image/jpeg', buffer: (await photograph(threeInkDrawing())).jpeg })
    await form.locator('input[name="title"]').fill(title)
    await form.locator('input[name="widthMm"]').fill('120')
    const team = form.locator('select[name="teamId"]')
    if (await team.inputValue() === '') await team.selectOption({ label: 'Copper Wrens' })
    await form.locator('button[type="submit"]').click()

    const found = page.locator('[data-test="upload-found"]')
    await found.waitFor({ timeout: 60_000 })
    expect(await found.locator('[data-test="found-count"]').innerText()).toBe('3 inks: yellow, red and blue')
    const swatches = found.locator('[data-test="ink-swatch"]')
    expect(await swatches.allInnerTexts()).toEqual(['yellow', 'red', 'blue'])
    for (const hex of await swatches.evaluateAll((els) => els.map((e) => e.getAttribute('data-hex')))) expect(hex).toMatch(/^#[0-9a-f]{6}$/)
    await screenshot(page, 'layers-upload-found')
    await found.locator('[data-test="found-open"]').click()
    await page.waitForURL((u) => /^\/artworks\/\d+$/.test(u.pathname))
    artworkPath = new URL(page.url()).pathname
    expect(errors).toEqual([])
    await page.close()
  }, 120_000)

  it('draws the layers stacked in their colours, one alone when chosen, with the measurements of each', async () => {
    expect(artworkPath).toMatch(/^\/artworks\/\d+$/)
    const page = await tabletPage('')
    const errors = consoleErrors(page)
    await signInThroughForm(page, DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname !== '/sign-in')
    await page.goto(url(page, artworkPath), { waitUntil: 'networkidle' })
    const view = page.locator('[data-test="revision-layers"]')
    await view.locator('[data-test="layers-drawn-stacked"]').waitFor()
    const fills = await drawnFills(page)
    expect(fills).toHaveLength(3)
    expect(await view.locator('[data-test="layer-measurements"] tbody tr').count()).toBe(4)
    expect(await view.locator('[data-test="layer-measurements-title"]').innerText()).toBe('All layers in total')
    await screenshot(page, 'layers-artwork-stacked')

    // The red layer alone: one group, red's fill; its own measurements.
    await view.locator('label:has([data-test="layer-choice-1"])').click()
    await view.locator('[data-test="layers-drawn-one"]').waitFor()
    expect(await drawnFills(page)).toEqual([fills[1]])
    expect(await view.locator('[data-test="layer-measurements-title"]').innerText()).toBe('The red layer alone')
    const total = await page.locator('[data-test="measure-cutLengthMm"]').last().innerText()
    expect(total).toMatch(/mm$/)
    // Chosen from the keyboard too: the arrow moves to the next layer.
    await view.locator('[data-test="layer-choice-1"]').press('ArrowRight')
    await expect.poll(() => view.locator('[data-test="layer-measurements-title"]').innerText()).toBe('The blue layer alone')
    await screenshot(page, 'layers-artwork-one')
    expect(errors).toEqual([])
    await page.close()
  }, 60_000)
})
