// The operator's sheet in a real browser: two queued jobs in one film ticked in the cut queue
// become a batch; its page and a job's page print (Chromium's own PDF) to one clean page with
// the sheet drawn to scale and nothing of the navigation or the buttons, read back by
// poppler's pdfinfo and pdftotext; the batch is cut from its page.
import { execFileSync } from 'node:child_process'
import { existsSync, mkdirSync } from 'node:fs'
import path from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import sharp from 'sharp'
import { hashPassword } from '../../server/platform/passwords'
import { ARTEFACTS, screenshot, setupBrowser, signInThroughForm, tabletPage } from '../support/browser'
import { testDb } from '../support/db'
import { addArtwork, addRobot, buildProgram, type ProgramFixture } from '../support/fixtures'
import { putKey } from '../support/s3'
import { rectPathData, svgMm } from '../unit/cutsheet/shapes'

await setupBrowser()

const PASSWORD = 'printed-sheet-password'
let program: ProgramFixture
let jobs: number[]

/** Prints the page to PDF as Chromium does (print media, the page's @page rules) and reads it back with poppler-utils. */
async function printed(page: Page, name: string, format: 'A4' | 'Letter', onPage?: number) {
  for (const tool of ['/usr/bin/pdfinfo', '/usr/bin/pdftotext']) {
    if (!existsSync(tool)) throw new Error(`${tool} is missing: the printed sheet is read back with it. Install it with: apt-get install poppler-utils`)
  }
  mkdirSync(ARTEFACTS, { recursive: true })
  const file = path.join(ARTEFACTS, `${name}-${format}.pdf`)
  await page.pdf({ path: file, format, preferCSSPageSize: true })
  const info = execFileSync('/usr/bin/pdfinfo', [file]).toString('utf8')
  const pages = Number(/^Pages:\s+(\d+)/m.exec(info)?.[1])
  const range = onPage ? ['-f', String(onPage), '-l', String(onPage)] : []
  const text = execFileSync('/usr/bin/pdftotext', ['-layout', ...range, file, '-']).toString('utf8')
  return { pages, text }
}

/**
 * Dark pixels of the on-screen sheet picture as the browser shows it at each width (the
 * picture's box set to that width, then an element screenshot). Lines drawn in millimetres
 * (hair-lines) grow in length and width with the picture, so their ink grows with the square
 * of its size, and a 0.1 mm line on a 300 mm sheet shown 300 px wide is too faint to count;
 * lines of a fixed width in screen pixels grow only in length. Read off the page itself, not
 * off a canvas the picture is drawn into: a canvas may draw an SVG picture from a raster made
 * at another size (Chromium 150 does), which is not what a person sees.
 */
async function shownInk(page: Page, widths: number[]): Promise<number[]> {
  const image = page.locator('[data-test="cut-sheet-image"]')
  const out: number[] = []
  for (const w of widths) {
    await image.evaluate(async (img: HTMLImageElement, width: number) => {
      img.parentElement!.style.width = `${width}px`
      await new Promise<void>((done) => requestAnimationFrame(() => requestAnimationFrame(() => done())))
    }, w)
    const { data, info } = await sharp(await image.screenshot()).removeAlpha().raw().toBuffer({ resolveWithObject: true })
    let dark = 0
    for (let i = 0; i < data.length; i += info.channels) if (data[i]! + data[i + 1]! + data[i + 2]! < 3 * 128) dark++
    out.push(dark)
  }
  await image.evaluate((img: HTMLImageElement) => { img.parentElement!.style.width = '' })
  return out
}

/** What only the screen shows: the navigation, the footer, buttons and forms. */
const SCREEN_ONLY = ['Sign out', 'Cut queue', 'Sheet options', 'Downloads for sheet', 'Mark every job cut', 'from a drawing on paper to a decal on the robot']

beforeAll(async () => {
  const db = testDb()
  program = await buildProgram(db, { passwordHash: await hashPassword(PASSWORD) })
  const key = `vectors/printed-sheet-${Date.now()}.svg`
  await putKey(key, svgMm(20, 20, [`${rectPathData(0, 0, 20, 20)}${rectPathData(5, 5, 10, 10)}`]), 'image/svg+xml')
  const art = await addArtwork(db, { teamId: program.teams[0].id, authorId: program.mentor, status: 'approved', vectorKey: key, widthMm: 20, heightMm: 20 })
  jobs = []
  for (const quantity of [3, 2]) {
    const robot = await addRobot(db, program.teams[0].id)
    const p = await db.insertInto('placement').values({ robot_id: robot, revision_id: art.revisionId, film_id: program.films.pet, spot: 'front', width_mm: 20, quantity, created_by: program.mentor })
      .returning('id').executeTakeFirstOrThrow()
    jobs.push((await db.insertInto('job').values({ placement_id: p.id, kind: 'initial', quantity, film_id: program.films.pet, width_mm: 20, created_by: program.mentor })
      .returning('id').executeTakeFirstOrThrow()).id)
  }
})

describe('the operator\'s sheet', () => {
  it('batches ticked jobs from the queue, prints the batch and a job on one clean page each, and cuts the batch', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, program.emails.get(program.teams[0].operator)!, PASSWORD)
    await page.waitForURL((u) => u.pathname !== '/sign-in')
    await page.goto(new URL('/lab', page.url()).toString(), { waitUntil: 'networkidle' })
    // The queue suggests the pair (same film, queued); the operator ticks them instead.
    await expect(page.locator('[data-test="batch-suggestions"]').textContent()).resolves.toContain(`jobs ${jobs.join(', ')}`)
    for (const id of jobs) await page.locator(`[data-test="choose-${id}"]`).check()
    await page.locator('[data-test="batch-chosen"]').click()
    await page.waitForURL((u) => u.pathname.startsWith('/lab/batches/'))
    await page.waitForLoadState('networkidle')
    const batchId = Number(page.url().split('/').pop())
    await screenshot(page, 'batch-page')
    for (const id of jobs) await page.locator(`[data-test="batch-job-${id}"]`).waitFor()
    await expect(page.locator('[data-test="batch-kerf"]').textContent()).resolves.toContain('0.15')
    // The shared sheet's picture, built in the pool and kept.
    const image = page.locator('[data-test="cut-sheet-image"]')
    await expect.poll(() => image.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), { timeout: 20_000 }).toBeGreaterThan(0)

    for (const format of ['A4', 'Letter'] as const) {
      const { pages, text } = await printed(page, 'batch-sheet', format)
      expect(pages).toBe(1)
      expect(text).toContain(`Batch ${batchId}: job sheet`)
      // The fixture film's 300 × 200 mm sheet at 1 : 2 fits the 180 × 105 mm drawing area.
      expect(text).toMatch(/Sheet 1 of 1, 300 × 200 mm, drawn at 1 : 2/)
      expect(text).toContain('mm on the film')
      for (const id of jobs) expect(text).toContain(`${id}-1`)
      expect(text).toMatch(/Kerf: 0\.15 mm, compensated/)
      expect(text).toContain('Estimated cut time')
      expect(text).toContain('Weeded')
      expect(text).toContain('Operator\'s signature')
      expect(text).toContain('Never bypass an interlock')
      for (const words of SCREEN_ONLY) expect(text).not.toContain(words)
    }

    await page.goto(new URL(`/lab/jobs/${jobs[0]}`, page.url()).toString(), { waitUntil: 'networkidle' })
    const job = await printed(page, 'job-sheet', 'A4')
    expect(job.pages).toBe(1)
    expect(job.text).toContain(`Job ${jobs[0]}: job sheet`)
    expect(job.text).toContain(`${jobs[0]}-3`)
    for (const words of SCREEN_ONLY) expect(job.text).not.toContain(words)
    // In a batch, the job is cut with it, not on its own.
    await expect(page.locator('[data-test="mark-cut"]').count()).resolves.toBe(0)
    await expect(page.locator('[data-test="job-batch"]').count()).resolves.toBe(1)

    await page.goto(new URL(`/lab/batches/${batchId}`, page.url()).toString(), { waitUntil: 'networkidle' })
    await page.locator('[data-test="cut-batch"]').click()
    await page.locator('[data-test="batch-state"]', { hasText: 'Cut' }).waitFor()
    const states = await testDb().selectFrom('job').select('state').where('id', 'in', jobs).execute()
    expect(states.map((s) => s.state)).toEqual(['cut', 'cut'])
  })

  it('prints every sheet of a job on a page of its own, to scale, and shows the sheet with lines a person can see', async () => {
    const db = testDb()
    const art = await db.selectFrom('placement').select('revision_id').innerJoin('job', 'job.placement_id', 'placement.id').where('job.id', '=', jobs[0]!).executeTakeFirstOrThrow()
    const robot = await addRobot(db, program.teams[0].id)
    // 120 mm copies: two side by side on the fixture's 300 × 200 mm sheet, one row; three copies take two sheets.
    const p = await db.insertInto('placement').values({ robot_id: robot, revision_id: art.revision_id, film_id: program.films.pet, spot: 'side', width_mm: 120, quantity: 3, created_by: program.mentor })
      .returning('id').executeTakeFirstOrThrow()
    const big = (await db.insertInto('job').values({ placement_id: p.id, kind: 'initial', quantity: 3, film_id: program.films.pet, width_mm: 120, created_by: program.mentor })
      .returning('id').executeTakeFirstOrThrow()).id
    const page = await tabletPage('')
    await signInThroughForm(page, program.emails.get(program.teams[0].operator)!, PASSWORD)
    await page.waitForURL((u) => u.pathname !== '/sign-in')
    await page.goto(new URL(`/lab/jobs/${big}?frame=2`, page.url()).toString(), { waitUntil: 'networkidle' })
    await page.locator('[data-test="sheet-picker"]').waitFor()

    const image = page.locator('[data-test="cut-sheet-image"]')
    await expect.poll(() => image.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), { timeout: 30_000 }).toBeGreaterThan(0)
    await screenshot(page, 'job-two-sheets')
    const [small, large] = await shownInk(page, [250, 750])
    expect(small).toBeGreaterThan(200)
    // Three times the width: about three times the ink for pixel-wide lines, nine for lines in mm.
    expect(large! / small!).toBeLessThan(4.5)
    await expect(page.locator('[data-test="sheet-legend"]').textContent()).resolves.toMatch(/Copy outline \(cut\)[\s\S]*Weeding frame \(cut\)[\s\S]*Copy id/)

    for (const format of ['A4', 'Letter'] as const) {
      const all = await printed(page, 'job-two-sheets', format)
      expect(all.pages).toBe(2)
      const first = await printed(page, 'job-two-sheets', format, 1)
      expect(first.text).toContain(`Job ${big}: job sheet`)
      expect(first.text).toMatch(/Sheet 1 of 2, 300 × 200 mm, drawn at 1 : 2\b/)
      expect(first.text).toContain(`${big}-1`)
      expect(first.text).not.toContain('Sheet 2 of 2')
      const second = await printed(page, 'job-two-sheets', format, 2)
      expect(second.text).toContain(`Job ${big}: sheet 2 of 2`)
      // With the page to itself the drawing still fits 1 : 2 at most; the bar says what it measures.
      expect(second.text).toMatch(/Sheet 2 of 2, 300 × 200 mm, drawn at 1 : (1\.5|2)\b/)
      expect(second.text).toContain('mm on the film')
      expect(second.text).toContain(`${big}-3`)
      for (const words of SCREEN_ONLY) expect(all.text).not.toContain(words)
    }
  })
})
