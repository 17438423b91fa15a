// A coloured drawing in the browser: the upload page says which inks it found, with their
// colours; the artwork page draws every layer stacked in its colour and one layer alone, with
// the measurements of what is shown; on the bench a designer drops an ink and saves, and the
// new revision has the layers left.
import { describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { screenshot, setupBrowser, signedInPage, signInThroughForm, tabletPage } from '../support/browser'
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
    const page = await signedInPage(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, artworkPath)
    const errors = consoleErrors(page)
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

  it('on the bench, a designer drops the yellow ink and saves: the new revision is red and blue', async () => {
    expect(artworkPath).toMatch(/^\/artworks\/\d+$/)
    const page = await signedInPage(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD, `${artworkPath}/bench`)
    const errors = consoleErrors(page)
    const panel = page.locator('[data-test="bench-colours"]')
    await panel.locator('[data-test="colour-start"]').click()
    const found = panel.locator('[data-test="colour-found"] > li')
    await expect.poll(() => found.count(), { timeout: 30_000 }).toBeGreaterThanOrEqual(3)
    const names = await found.evaluateAll((lis) => lis.map((li) => li.querySelector('span:nth-child(2)')!.textContent!.trim()))
    const yellow = names.indexOf('yellow')
    expect(yellow).toBeGreaterThanOrEqual(0)
    await expect.poll(() => panel.locator('[data-test="colour-layers"] > li').count(), { timeout: 30_000 }).toBe(3)
    await panel.locator(`[data-test="drop-ink-${yellow}"]`).click()
    await expect.poll(() => panel.locator('[data-test="colour-layers"] > li').count(), { timeout: 30_000 }).toBe(2)
    expect(await panel.locator('[data-test="colour-sentence"]').innerText()).toMatch(/^2 inks found \(\d dropped\): red and blue/)
    await panel.locator('[data-test="colour-preview"] svg').waitFor()
    // A colour picked from the keyboard joins the list of picks.
    await panel.locator('[data-test="colour-pick-area"]').focus()
    await page.keyboard.press('ArrowLeft')
    await page.keyboard.press('Enter')
    await expect.poll(() => panel.locator('[data-test="colour-picks"] li').count()).toBe(1)
    await panel.locator('[data-test="colour-picks"] button').click()
    await screenshot(page, 'layers-bench-dropped')

    await page.locator('[data-test="save"]').click()
    await expect.poll(() => page.locator('[data-test="revision-item"][data-number="2"]').count(), { timeout: 60_000 }).toBe(1)
    await page.goto(url(page, `${artworkPath}?r=2`), { waitUntil: 'networkidle' })
    const view = page.locator('[data-test="revision-layers"]')
    await view.locator('[data-test="layers-drawn-stacked"]').waitFor()
    expect(await drawnFills(page)).toHaveLength(2)
    expect(await view.locator('[data-test="layer-measurements"] tbody tr').count()).toBe(3)
    await view.locator('label:has([data-test="layer-choice-0"])').click()
    await view.locator('[data-test="layers-drawn-one"]').waitFor()
    expect(await drawnFills(page)).toHaveLength(1)
    expect(await view.locator('[data-test="layer-measurements-title"]').innerText()).toBe('The red layer alone')
    await screenshot(page, 'layers-artwork-r2')
    expect(errors).toEqual([])
    await page.close()
  }, 180_000)
})
