import { describe, expect, it } from 'vitest'
import sharp from 'sharp'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, tabletPage, screenshot, followNav } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'

await setupBrowser()

const W = 1600
const H = 1200

/**
 * A phone photo of a drawing, made in code: bold shapes (a ring, a filled disc, a bar, a
 * triangle) in dark ink on paper, under a lighting gradient and a vignette, with sensor
 * noise, saved as JPEG with the pixels stored sideways and EXIF orientation 6 ("turn 90°
 * clockwise to show", TIFF/EXIF 2.3 Orientation tag), as phones do.
 */
async function phonePhoto(): Promise<Buffer> {
  const ink = '#2b2724'
  const drawing = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}">
  <rect width="100%" height="100%" fill="#ffffff"/>
  <circle cx="420" cy="600" r="300" fill="${ink}"/>
  <circle cx="420" cy="600" r="140" fill="#ffffff"/>
  <circle cx="1010" cy="380" r="150" fill="${ink}"/>
  <rect x="880" y="640" width="520" height="110" fill="${ink}"/>
  <path d="M 900 1050 L 1150 820 L 1400 1050 Z" fill="${ink}"/>
</svg>`
  const light = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}">
  <defs>
    <linearGradient id="l" x1="0" y1="0" x2="1" y2="1"><stop offset="0" stop-color="#f6f3ec"/><stop offset="1" stop-color="#cfc9be"/></linearGradient>
    <radialGradient id="v" cx="0.5" cy="0.5" r="0.75"><stop offset="0.55" stop-color="#ffffff"/><stop offset="1" stop-color="#d2cdc4"/></radialGradient>
  </defs>
  <rect width="100%" height="100%" fill="url(#l)"/>
</svg>`
  const vignette = light.replace('fill="url(#l)"', 'fill="url(#v)"')
  // Grey noise around the middle level: with the overlay blend, 128 leaves a pixel as it is.
  const noise = Buffer.alloc(W * H)
  let s = 7
  for (let i = 0; i < noise.length; i++) {
    s = (s * 1103515245 + 12345) & 0x7fffffff
    noise[i] = 128 + ((s >> 8) % 25) - 12
  }
  const upright = await sharp(Buffer.from(drawing))
    .composite([
      { input: Buffer.from(light), blend: 'multiply' },
      { input: Buffer.from(vignette), blend: 'multiply' },
      { input: await sharp(noise, { raw: { width: W, height: H, channels: 1 } }).toColourspace('srgb').png().toBuffer(), blend: 'overlay' },
    ])
    .png().toBuffer()
  // Stored sideways (turned 90° anticlockwise); the orientation tag turns it back.
  return sharp(upright).rotate(270).jpeg({ quality: 82 }).withMetadata({ orientation: 6 }).toBuffer()
}

const url = (page: Page, path: string) => new URL(path, page.url()).toString()
const text = (page: Page, test: string) => page.locator(`[data-test="${test}"]`).first().innerText()

/** Records every phase the upload progress bar shows, however briefly. */
async function watchProgress(page: Page): Promise<void> {
  await page.evaluate(() => {
    const seen: { phases: string[]; values: number[] } = { phases: [], values: [] }
    ;(window as unknown as { __progress: typeof seen }).__progress = seen
    const look = () => {
      const el = document.querySelector('[data-test="upload-progress"]')
      if (!el) return
      const phase = el.getAttribute('data-phase') ?? ''
      if (!seen.phases.includes(phase)) seen.phases.push(phase)
      const v = el.getAttribute('aria-valuenow')
      if (v !== null) seen.values.push(Number(v))
    }
    new MutationObserver(look).observe(document.body, { subtree: true, childList: true, attributes: true, characterData: true })
  })
}

/** Console errors of a page (a hydration mismatch shows up here), except failed loads the test causes on purpose. */
function consoleErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('console', (m) => { if (m.type() === 'error' && !/Failed to load resource/.test(m.text())) errors.push(m.text()) })
  page.on('pageerror', (e) => errors.push(String(e)))
  return errors
}

let artworkPath = ''
const title = `Harbour gear ${Date.now().toString(36)}`

describe('from a phone photo to revisions, in the browser', () => {
  it('a student uploads a phone photo through the form, watches the progress and lands on revision 1 with its measurements', async () => {
    const page = await tabletPage('')
    const errors = consoleErrors(page)
    await signInThroughForm(page, DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    // The start page offers the way in, and the navigation names the list.
    await expect.poll(() => page.locator('[data-test="recent-artworks"] [data-test="upload-link"]').count()).toBe(1)
    expect(await page.locator('[data-test="nav-artworks"]').count()).toBeGreaterThan(0)

    await page.goto(url(page, '/artworks/new'), { waitUntil: 'networkidle' })
    const form = page.locator('[data-test="upload-form"]')
    const photo = await phonePhoto()
    await form.locator('input[type="file"][name="file"]').setInputFiles({ name: 'harbour-gear.jpg', mimeType: 'image/jpeg', buffer: photo })
    // Title from the file name, the student's one team already chosen, 150 mm by default.
    await expect.poll(() => form.locator('input[name="title"]').inputValue()).toBe('harbour-gear')
    expect(await form.locator('select[name="teamId"] option:checked').innerText()).toBe('Copper Wrens')
    expect(await form.locator('input[name="widthMm"]').inputValue()).toBe('150')
    await expect.poll(() => page.locator('[data-test="upload-thumbnail"]').evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBeGreaterThan(0)
    await form.locator('input[name="title"]').fill(title)
    await form.locator('input[name="widthMm"]').fill('120')
    await screenshot(page, 'upload-form-chosen')

    await watchProgress(page)
    await form.locator('button[type="submit"]').click()
    await page.waitForURL((u) => /^\/artworks\/\d+$/.test(u.pathname), { timeout: 30_000 })
    const seen = await page.evaluate(() => (window as unknown as { __progress: { phases: string[]; values: number[] } }).__progress)
    expect(seen.phases).toEqual(['sending', 'outlining'])
    artworkPath = new URL(page.url()).pathname

    await expect.poll(() => text(page, 'artwork-title')).toBe(title)
    await expect.poll(() => page.locator('[data-test="revision-row-1"]').count()).toBe(1)
    expect(await page.locator('[data-test^="revision-row-"]').count()).toBe(1)
    expect(await text(page, 'artwork-facts')).toMatch(/Copper Wrens[\s\S]*Draft[\s\S]*Priya Castellanos/)
    // Upright (after the orientation tag) the drawing's ink spans x 120…1400 and y 230…1050 of
    // the 1600 × 1200 px photo: the decal is trimmed to it, 120 mm wide → 76.9 mm high.
    await expect.poll(() => text(page, 'measure-widthMm')).toBe('120')
    expect(Math.abs(Number(await text(page, 'measure-heightMm')) - (120 * 820) / 1280)).toBeLessThanOrEqual(0.2)
    // Ring, disc, bar, triangle: four pieces, the ring's one hole.
    expect(await text(page, 'measure-pieces')).toBe('4 pieces')
    expect(await text(page, 'measure-holes')).toBe('1 hole')
    expect(Number.parseFloat(await text(page, 'measure-fidelity'))).toBeGreaterThan(95)
    expect(await text(page, 'measure-fidelity')).toMatch(/^\d+\.\d %$/)
    expect(await text(page, 'measure-inkAreaMm2')).toMatch(/mm²$/)
    // About 450 mm of outline: under a metre, so in millimetres only.
    expect(await text(page, 'measure-cutLengthMm')).toMatch(/^\d{3} mm$/)
    // about 10 px/mm: the trim to the ink's exact width moves it by a fraction of a pixel
    expect(Number(await text(page, 'measure-pxPerMm'))).toBeGreaterThan(9.9)
    expect(await text(page, 'engine-versions')).toMatch(/potrace 2\.1\.8/)
    for (const panel of ['source', 'prepared', 'vector']) {
      await expect.poll(() => page.locator(`[data-test="panel-${panel}"] img`).evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), { message: panel }).toBeGreaterThan(0)
    }
    expect(await page.locator('[data-test="panel-vector"] img').getAttribute('src')).toMatch(/^\/api\/revisions\/\d+\/vector\.svg$/)
    expect(await page.locator('[data-test="download-vector"]').getAttribute('href')).toMatch(/vector\.svg\?download=1$/)
    // A student sees the outline but does not tune it.
    expect(await page.locator('[data-test="revise-form"]').count()).toBe(0)
    expect(await page.locator('[data-test="open-bench"]').count()).toBe(0)
    await screenshot(page, 'artwork-student-r1')

    // The list finds it by a word of its title, and the search is kept in the address.
    await page.goto(url(page, '/artworks'), { waitUntil: 'networkidle' })
    await page.locator('[data-test="artwork-search"]').fill(title.split(' ').at(-1)!)
    await page.waitForURL((u) => u.searchParams.get('q') === title.split(' ').at(-1))
    await expect.poll(() => page.locator('[data-test="artworks-table"] tbody tr').count()).toBe(1)
    expect(await page.locator('[data-test="artworks-table"] tbody tr').first().innerText()).toMatch(new RegExp(`Copper Wrens[\\s\\S]*${title}[\\s\\S]*Revision 1[\\s\\S]*Draft`))
    expect(await text(page, 'page-range')).toBe('1–1 of 1')
    await screenshot(page, 'artwork-list-search')
    expect(errors).toEqual([])
    await page.close()
  })

  it('a designer makes revision 2 with another threshold and width, and sees it listed beside revision 1', async () => {
    expect(artworkPath, 'the upload above made an artwork').toMatch(/^\/artworks\/\d+$/)
    const page = await tabletPage('')
    const errors = consoleErrors(page)
    await signInThroughForm(page, DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    // Opened straight from its address: rendered on the server, then taken over in the browser.
    await page.goto(url(page, artworkPath), { waitUntil: 'networkidle' })
    await expect.poll(() => text(page, 'artwork-title')).toBe(title)
    expect(await page.locator('[data-test="open-bench"]').getAttribute('href')).toBe(`${artworkPath}/bench`)

    const form = page.locator('[data-test="revise-form"]')
    // The form starts from revision 1: its width and its automatic threshold.
    expect(await form.locator('input[name="widthMm"]').inputValue()).toBe('120')
    expect(await form.locator('input[name="thresholdMode"][value="auto"]').isChecked()).toBe(true)
    await form.locator('input[name="widthMm"]').fill('90')
    await form.locator('input[name="thresholdMode"][value="manual"]').check()
    await form.locator('input[name="thresholdValue"]').fill('300')
    await form.locator('button[type="submit"]').click()
    // Out of range is caught in the form, beside the field.
    await expect.poll(() => page.locator('[data-test="error-thresholdValue"]').count()).toBe(1)
    await form.locator('input[name="thresholdValue"]').fill('100')
    await form.locator('input[name="lightingEvening"][value="on"]').check()
    await form.locator('button[type="submit"]').click()

    await page.waitForURL((u) => u.searchParams.get('r') === '2', { timeout: 30_000 })
    await expect.poll(() => page.locator('[data-test^="revision-row-"]').count()).toBe(2)
    // Sizes of the trimmed drawing (ink 1280 × 820 px): 90 × 57.7 and 120 × 76.9 mm, give or take
    // the anti-aliased edges' 0.2 mm.
    const size = async (n: number) => (await page.locator(`[data-test="revision-row-${n}"] [data-test="revision-size"]`).innerText()).match(/^([\d.]+) × ([\d.]+) mm$/)!.slice(1).map(Number)
    const [w2, h2] = await size(2)
    const [w1, h1] = await size(1)
    expect(w2).toBe(90)
    expect(Math.abs(h2! - (90 * 820) / 1280)).toBeLessThanOrEqual(0.2)
    expect(w1).toBe(120)
    expect(Math.abs(h1! - (120 * 820) / 1280)).toBeLessThanOrEqual(0.2)
    // The newest first, and the shown revision is the new one.
    expect(await page.locator('[data-test^="revision-row-"]').first().getAttribute('data-test')).toBe('revision-row-2')
    expect(await page.locator('[data-test="revision-row-2"]').getAttribute('aria-current')).toBe('true')
    await expect.poll(() => text(page, 'measure-widthMm')).toBe('90')
    expect(Number(await text(page, 'measure-heightMm'))).toBe(h2)
    expect(await text(page, 'measure-threshold')).toBe('100')
    expect(await page.locator('[data-test="revision-row-2"]').innerText()).toMatch(/Kofi Lindqvist/)
    // The form now starts from revision 2.
    await expect.poll(() => form.locator('input[name="thresholdValue"]').inputValue()).toBe('100')
    expect(await form.locator('input[name="lightingEvening"][value="on"]').isChecked()).toBe(true)
    await screenshot(page, 'artwork-designer-r2')

    // Choosing revision 1 in the list shows it again.
    await page.locator('[data-test="revision-row-1"]').click()
    await page.waitForURL((u) => u.searchParams.get('r') === '1')
    await expect.poll(() => text(page, 'measure-widthMm')).toBe('120')
    expect(await page.locator('[data-test="revision-row-1"]').getAttribute('aria-current')).toBe('true')
    await screenshot(page, 'artwork-designer-r1-again')

    // On a phone the three panels stack, one above the other.
    await page.setViewportSize({ width: 390, height: 844 })
    const boxes = await Promise.all(['source', 'prepared', 'vector'].map((p) => page.locator(`[data-test="panel-${p}"]`).boundingBox()))
    expect(boxes[0]!.y).toBeLessThan(boxes[1]!.y)
    expect(boxes[1]!.y).toBeLessThan(boxes[2]!.y)
    expect(Math.abs(boxes[0]!.x - boxes[2]!.x)).toBeLessThan(1)
    await screenshot(page, 'artwork-phone')
    expect(errors).toEqual([])
    await page.close()
  })

  it('a mentor sees it on the program home and filters the list by team', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/program')
    await expect.poll(() => page.locator('[data-test="recent-artworks"]').innerText()).toContain(title)
    await screenshot(page, 'program-recent-artworks')

    await followNav(page, 'artworks')
    await page.waitForURL((u) => u.pathname === '/artworks')
    const teamSelect = page.locator('select[name="teamId"]')
    await expect.poll(() => teamSelect.locator('option').allInnerTexts()).toEqual(['All teams', 'Copper Wrens', 'Tidewater Sprockets'])
    await teamSelect.selectOption({ label: 'Tidewater Sprockets' })
    await page.waitForURL((u) => u.searchParams.has('teamId'))
    // Other tests may have uploaded for that team: the list holds its artworks only, or says it has none.
    await expect.poll(() => page.locator('main').innerText()).not.toContain(title)
    if (await page.locator('[data-test="artworks-empty"]').count()) expect(await text(page, 'artworks-empty')).toMatch(/No artworks in Tidewater Sprockets/)
    else expect((await page.locator('[data-test="artworks-table"] tbody tr').allInnerTexts()).filter((row) => !row.includes('Tidewater Sprockets'))).toEqual([])
    await teamSelect.selectOption({ label: 'Copper Wrens' })
    await expect.poll(() => page.locator('[data-test="artworks-table"]').count()).toBe(1)
    await expect.poll(() => text(page, 'artworks-table')).toContain(title)
    expect((await page.locator('[data-test="artworks-table"] tbody tr').allInnerTexts()).filter((row) => !row.includes('Copper Wrens'))).toEqual([])
    await page.close()
  })

  it('says plainly what the server said about a file that is not a picture or not a drawing, and stops an oversized one before sending', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.goto(url(page, '/artworks/new'), { waitUntil: 'networkidle' })
    const form = page.locator('[data-test="upload-form"]')
    const posts: string[] = []
    page.on('request', (r) => { if (r.method() === 'POST' && new URL(r.url()).pathname === '/api/artworks') posts.push(r.url()) })

    // Larger than 25 MB, dropped on the drop zone: refused in the browser, nothing sent.
    const dropped = await page.evaluateHandle(() => {
      const dt = new DataTransfer()
      dt.items.add(new File([new Uint8Array(26 * 1024 * 1024)], 'enormous-scan.png', { type: 'image/png' }))
      return dt
    })
    await page.dispatchEvent('[data-test="drop-zone"]', 'drop', { dataTransfer: dropped })
    await expect.poll(() => text(page, 'chosen-file')).toBe('enormous-scan.png')
    await expect.poll(() => page.locator('[data-test="error-file"]').count()).toBe(1)
    expect(await text(page, 'error-file')).toMatch(/the limit is 25 MB/)
    await form.locator('button[type="submit"]').click()
    expect(await text(page, 'error-file')).toMatch(/the limit is 25 MB/)
    expect(posts).toEqual([])

    // Words in a file named .png: the server reads the content and answers 415.
    await form.locator('input[name="file"]').setInputFiles({ name: 'not-really.png', mimeType: 'image/png', buffer: Buffer.from('just some words, not a picture') })
    await expect.poll(() => page.locator('[data-test="error-file"]').count()).toBe(0)
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => page.locator('[data-test="form-error"]').count(), { timeout: 15_000 }).toBe(1)
    expect(await text(page, 'form-error')).toBe('This file is not a picture we can read. Upload a photo or scan as JPEG, PNG, WebP, TIFF, GIF or AVIF.')
    expect(posts).toHaveLength(1)
    expect(new URL(page.url()).pathname).toBe('/artworks/new')
    expect(await page.locator('[data-test="upload-progress"]').count()).toBe(0)
    await screenshot(page, 'upload-not-a-picture')

    // A picture of blank paper: read, but it cannot become a decal. The server's sentence, what
    // usually helps, and nothing stored; choosing another picture clears it.
    const blank = await sharp({ create: { width: 900, height: 600, channels: 3, background: '#f2efe8' } }).jpeg().toBuffer()
    await form.locator('input[name="file"]').setInputFiles({ name: 'empty-page.jpg', mimeType: 'image/jpeg', buffer: blank })
    await form.locator('button[type="submit"]').click()
    const refused = page.locator('[data-test="upload-refused"]')
    await expect.poll(() => refused.count(), { timeout: 20_000 }).toBe(1)
    expect(await text(page, 'refusal-reason')).toMatch(/^No drawing was found: the picture reads as blank paper\./)
    expect(await refused.innerText()).toMatch(/This picture cannot become a decal[\s\S]*Nothing was stored/)
    expect(await page.locator('[data-test="refusal-tips"] li').count()).toBeGreaterThanOrEqual(2)
    expect(await page.locator('[data-test="form-error"]').count()).toBe(0)
    expect(new URL(page.url()).pathname).toBe('/artworks/new')
    await screenshot(page, 'upload-not-a-drawing')
    await form.locator('input[name="file"]').setInputFiles({ name: 'another.png', mimeType: 'image/png', buffer: await sharp(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="40" height="40"><rect width="40" height="40" fill="#fff"/><circle cx="20" cy="20" r="12"/></svg>')).png().toBuffer() })
    await expect.poll(() => refused.count()).toBe(0)
    await page.close()
  })
})
