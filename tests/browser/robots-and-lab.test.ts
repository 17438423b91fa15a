import { readFile } from 'node:fs/promises'
import { beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, tabletPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { signedIn, type ApiClient } from '../support/client'
import { drawing } from '../support/images'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

// From a submitted revision to a decal on a robot and a reprint in the queue, in the browser:
// the mentor approves and places it, the operator cuts and applies it, the student asks for more.

const stamp = Date.now().toString(36)
const title = `Tern crest ${stamp}`
const robotName = `Gannet ${stamp}`
const SPOT = 'left side panel'
const PET = 'Matte black polyester film'
const PVC = 'Glossy white sign vinyl'

let mentorApi: ApiClient
let revisionId: number
let artworkId: number
let robotId: number
let placementId: number
let jobId: number
/** The decal's height at 60 mm wide: the drawing's own proportions (it is trimmed to its ink). */
let heightMm: number

const url = (page: Page, path: string) => new URL(path, page.url()).toString()
const byTest = (page: Page, test: string) => page.locator(`[data-test="${test}"]`)
/** A size as the pages write it: one decimal at most (app/utils/format.ts, formatNumber). */
const oneDecimal = (v: number) => new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 }).format(v)

beforeAll(async () => {
  const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const wrens = (await student.get('/api/me')).body.teams.find((t: { name: string }) => t.name === 'Copper Wrens').id
  // The drawing's ink is 338 × 256 px of the 600 × 400 px picture: at 60 mm wide a decal of
  // 60 × 45.4 mm (give or take its anti-aliased edges).
  const up = await uploadArtwork(student, { file: await drawing('png', 600, 400), title, teamId: wrens, widthMm: 60, fileName: 'tern-crest.png' })
  expect(up.status, JSON.stringify(up.body)).toBe(201)
  heightMm = up.body.revision.heightMm
  expect(Math.abs(heightMm - (60 * 256) / 338)).toBeLessThan(0.2)
  revisionId = up.body.revision.id
  artworkId = up.body.artwork.id
  const submitted = await student.post(`/api/revisions/${revisionId}/submit`)
  expect(submitted.status, JSON.stringify(submitted.body)).toBe(200)
  expect(submitted.body.status).toBe('in-review')

  mentorApi = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
  const robot = await mentorApi.post('/api/robots', { teamId: wrens, name: robotName, season: '2026–27' })
  expect(robot.status, JSON.stringify(robot.body)).toBe(201)
  robotId = robot.body.id
})

describe('review, placement, the cut queue and a reprint, in the browser', () => {
  it('a mentor approves the submitted revision on the review page', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/program')
    await page.goto(url(page, '/reviews'), { waitUntil: 'networkidle' })

    const card = byTest(page, `review-card-${revisionId}`)
    await expect.poll(() => card.count()).toBe(1)
    const words = await card.innerText()
    expect(words).toContain(title)
    expect(words).toContain('Copper Wrens')
    expect(words).toContain(DEMO_ACCOUNTS.student.name)
    expect(words).toContain(`60 × ${oneDecimal(heightMm)} mm`)
    expect(words).toMatch(/Narrowest stroke/)
    expect(words).toMatch(/Fidelity\s+\d+\.\d %/)
    // The drawing itself is shown, and the card links to the artwork at this revision.
    await expect.poll(() => card.locator('img').evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBeGreaterThan(0)
    expect(await byTest(page, `review-open-${revisionId}`).getAttribute('href')).toBe(`/artworks/${artworkId}?r=1`)

    await screenshot(page, 'reviews-mentor')

    // Sending back needs a comment: without one, the card says so and stays.
    await byTest(page, `send-back-${revisionId}`).click()
    await expect.poll(() => card.locator('[data-test="error-comment"]').count()).toBe(1)
    expect(await card.count()).toBe(1)

    await byTest(page, `approve-${revisionId}`).click()
    await expect.poll(() => card.count()).toBe(0)
    expect(await byTest(page, 'notice').innerText()).toMatch(new RegExp(`Approved “${title}” r1`))
    expect((await mentorApi.get(`/api/revisions/${revisionId}`)).body.status).toBe('approved')
  })

  it('the mentor cannot choose the PVC film, and places the approved revision in chlorine-free film', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/program')
    await page.goto(url(page, `/robots/${robotId}`), { waitUntil: 'networkidle' })
    await expect.poll(() => byTest(page, 'robot-name').innerText()).toBe(robotName)
    expect(await byTest(page, 'no-placements').count()).toBe(1)

    const form = byTest(page, 'placement-form')
    await expect.poll(() => form.count()).toBe(1)
    // The approved revision is offered (among the team's others), with its own width as the starting width.
    const revisionSelect = form.locator('select[name="revisionId"]')
    await revisionSelect.selectOption((await revisionSelect.locator('option', { hasText: `${title} r1` }).getAttribute('value'))!)
    expect(await revisionSelect.locator('option:checked').innerText()).toContain(`${title} r1`)
    expect(await form.locator('input[name="widthMm"]').inputValue()).toBe('60')

    // Every film is listed; the PVC one is there but disabled, with the reason beside the select.
    const filmSelect = form.locator('select[name="filmId"]')
    const pvcOption = filmSelect.locator('option', { hasText: PVC })
    expect(await pvcOption.count()).toBe(1)
    expect(await pvcOption.evaluate((o: HTMLOptionElement) => o.disabled)).toBe(true)
    expect(await filmSelect.locator('option', { hasText: PET }).evaluate((o: HTMLOptionElement) => o.disabled)).toBe(false)
    const why = form.locator('[data-test^="film-unusable-"]', { hasText: PVC })
    expect(await why.count()).toBe(1)
    expect(await why.innerText()).toMatch(/hydrogen chloride/)
    expect(await why.innerText()).toMatch(/Never cut/)

    await filmSelect.selectOption({ label: PET })
    await form.locator('input[name="spot"]').fill(SPOT)
    await form.locator('input[name="widthMm"]').fill('50')
    // Placed 50 mm wide, the height follows the drawing's proportions.
    await expect.poll(async () => Number(/Height follows: ([\d.]+) mm/.exec(await form.innerText())?.[1])).toBeCloseTo((50 * heightMm) / 60, 1)
    await form.locator('input[name="quantity"]').fill('2')
    await form.locator('input[name="spares"]').fill('1')
    await form.locator('button[type="submit"]').click()

    await expect.poll(() => byTest(page, 'notice').count()).toBe(1)
    expect(await byTest(page, 'notice').innerText()).toMatch(new RegExp(`Placed “${title}” r1 on the ${SPOT} in ${PET}`))
    const robot = (await mentorApi.get(`/api/robots/${robotId}`)).body
    expect(robot.placements).toHaveLength(1)
    placementId = robot.placements[0].id
    jobId = robot.placements[0].jobs[0].id
    expect(robot.placements[0]).toMatchObject({ spot: SPOT, widthMm: 50, quantity: 2, spares: 1, film: { name: PET } })

    const placed = byTest(page, `placement-${placementId}`)
    await expect.poll(() => placed.count()).toBe(1)
    const text = await placed.innerText()
    expect(text).toContain(SPOT)
    expect(text).toContain(`${title} r1`)
    expect(text).toContain(`50 × ${oneDecimal((50 * heightMm) / 60)} mm`)
    expect(text).toContain(PET)
    expect(await byTest(page, `placement-job-${jobId}`).innerText()).toMatch(/First cut, 3 copies\s*Queued/)
    expect(await byTest(page, `placement-revision-${placementId}`).getAttribute('href')).toBe(`/artworks/${artworkId}?r=1`)
    // The thumbnail is drawn, at a size in proportion to its real width.
    const thumb = placed.locator('img')
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBeGreaterThan(0)
    const box = await thumb.boundingBox()
    expect(box!.width / box!.height).toBeCloseTo(60 / heightMm, 1)
    await screenshot(page, 'robot-page-mentor')

    // The robots list shows the same decal in the robot's card.
    await page.goto(url(page, '/robots'), { waitUntil: 'networkidle' })
    const robotCard = byTest(page, `robot-${robotId}`)
    await expect.poll(() => robotCard.count()).toBe(1)
    expect(await robotCard.innerText()).toMatch(new RegExp(`${SPOT}[\\s\\S]*${PET}[\\s\\S]*2 on the robot \\+ 1 spare`))
    await screenshot(page, 'robots-list-mentor')
  })

  it('the operator opens the job from the queue, downloads the cut sheet, and marks it cut and then applied', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/lab')
    const row = byTest(page, `job-row-${jobId}`)
    await expect.poll(() => row.count()).toBe(1)
    // The lab page keeps its cautions next to the queue.
    expect(await byTest(page, 'caution').count()).toBe(1)
    const rowText = await row.innerText()
    expect(rowText).toMatch(/First cut/)
    // Sheets needed against the shelf: one of the demo's 14.
    expect(await byTest(page, `job-sheets-${jobId}`).innerText()).toMatch(/1 of \d+/)
    expect(await byTest(page, `job-film-${jobId}`).innerText()).toMatch(/Allowed[\s\S]*Polyester \(PET\)/)
    expect(rowText).toContain(`${title} r1`)
    expect(rowText).toContain(robotName)
    expect(rowText).toContain(SPOT)
    expect(rowText).toContain(PET)
    expect(rowText).toMatch(/Queued/)

    await row.locator(`[data-test="job-link-${jobId}"]`).click()
    await page.waitForURL((u) => u.pathname === `/lab/jobs/${jobId}`)
    await page.waitForLoadState('networkidle')
    const image = byTest(page, 'cut-sheet-image')
    // The first sheet is built in a worker thread and kept: allow for the thread's start on a busy machine.
    await expect.poll(() => image.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), { timeout: 20_000 }).toBeGreaterThan(0)
    expect(await byTest(page, 'job-state').innerText()).toMatch(/Queued/)
    // 3 copies of 50 × 37.9 mm fit on one 300 × 200 mm sheet; the film's laser settings and the estimate are shown.
    expect(await byTest(page, 'usage').innerText()).toMatch(/Film usage \d+\.\d % of 1 sheet/)
    expect(await byTest(page, 'laser-settings').innerText()).toMatch(/55 %[\s\S]*12 mm\/s[\s\S]*1/)
    expect(await byTest(page, 'estimate').innerText()).toMatch(/About \d+[\s\S]*mm\/s/)
    expect(await byTest(page, 'caution').innerText()).toMatch(/interlock[\s\S]*Extraction[\s\S]*unattended[\s\S]*extinguisher[\s\S]*eyewear[\s\S]*safety data sheet[\s\S]*chlorine-free[\s\S]*machine's manual/i)

    // A weeding frame changes the files offered for download.
    await page.locator('input[name="frame"]').fill('2')
    await page.locator('input[name="frame"]').press('Enter')
    await page.waitForURL((u) => u.searchParams.get('frame') === '2')
    await expect.poll(() => byTest(page, 'download-svg').getAttribute('href')).toContain('frame=2')
    expect(await byTest(page, 'download-dxf').getAttribute('href')).toContain('frame=2')

    const [download] = await Promise.all([page.waitForEvent('download'), byTest(page, 'download-svg').click()])
    expect(download.suggestedFilename()).toMatch(new RegExp(`^job-${jobId}-.*-r1\\.svg$`))
    const svg = await readFile((await download.path())!, 'utf8')
    expect(svg.startsWith('<svg')).toBe(true)
    // The film sheet is the page, in millimetres.
    expect(svg).toMatch(/^<svg[^>]*\swidth="300mm"/)
    expect(svg).toMatch(/^<svg[^>]*\sheight="200mm"/)
    // Three copies, each named by its job and number and with its weeding frame.
    expect(svg.match(/id="dw-copy-[\d-]+"/g)).toEqual([1, 2, 3].map((n) => `id="dw-copy-${jobId}-${n}"`))
    expect(svg.match(/id="dw-frame-[\d-]+"/g)).toHaveLength(3)

    // Cut: the layout's one sheet comes off the shelf; applied: two of the three go on the robot, one is a spare.
    expect(await byTest(page, 'job-film-verdict').innerText()).toMatch(/Allowed[\s\S]*Polyester/)
    await byTest(page, 'mark-cut').click()
    expect(await page.locator('input[name="sheetsUsed"]').inputValue()).toBe('1')
    await byTest(page, 'confirm-cut').click()
    await expect.poll(() => byTest(page, 'job-state').innerText()).toMatch(/^\s*Cut\s*$/)
    expect(await byTest(page, 'job-history').innerText()).toMatch(new RegExp(`Marked as cut\\s+\\(1 sheet\\)\\s+by ${DEMO_ACCOUNTS.operator.name}`))
    await byTest(page, 'mark-applied').click()
    expect(await page.locator('input[name="applied"]').inputValue()).toBe('2')
    await byTest(page, 'confirm-applied').click()
    await expect.poll(() => byTest(page, 'job-state').innerText()).toMatch(/^\s*Applied\s*$/)
    expect(await byTest(page, 'mark-applied').count()).toBe(0)
    expect(await byTest(page, 'job-history').innerText()).toMatch(new RegExp(`Marked as applied\\s+\\(2 on the robot\\)\\s+by ${DEMO_ACCOUNTS.operator.name}`))
    await screenshot(page, 'job-page-operator')
  })

  it('the student asks for a reprint from the robot page, and the operator sees it in the queue', async () => {
    const student = await tabletPage('')
    await signInThroughForm(student, DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    await student.waitForURL((u) => u.pathname === '/studio')
    await student.goto(url(student, `/robots/${robotId}`), { waitUntil: 'networkidle' })
    const placed = byTest(student, `placement-${placementId}`)
    await expect.poll(() => placed.count()).toBe(1)
    expect(await byTest(student, `placement-job-${jobId}`).innerText()).toMatch(/Applied/)
    // A student does not place decals.
    expect(await byTest(student, 'placement-form').count()).toBe(0)

    expect(await byTest(student, `spares-on-hand-${placementId}`).innerText()).toBe('1')
    await byTest(student, `reprint-${placementId}`).click()
    const form = byTest(student, 'reprint-form')
    await expect.poll(() => form.count()).toBe(1)
    // The spare on the shelf is offered first; the student asks for a reprint instead.
    expect(await byTest(student, 'spare-offer').innerText()).toMatch(/1 cut copy is on the shelf already/)
    await byTest(student, 'reprint-anyway').click()
    // A reason is needed.
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => form.locator('[data-test="error-reason"]').count()).toBe(1)
    await form.locator('input[name="quantity"]').fill('2')
    await form.locator('input[name="reason"]').fill('Torn off in a practice match')
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => byTest(student, 'notice').count()).toBe(1)
    expect(await byTest(student, 'notice').innerText()).toMatch(/Reprint asked for: 2 copies/)
    await expect.poll(() => byTest(student, `placement-jobs-${placementId}`).innerText()).toMatch(/Reprint, 2 copies\s*Queued/)
    const jobs = (await mentorApi.get(`/api/robots/${robotId}`)).body.placements[0].jobs
    const reprint = jobs.find((j: { kind: string }) => j.kind === 'reprint')
    expect(reprint).toMatchObject({ quantity: 2, state: 'queued' })

    const operator = await tabletPage('')
    await signInThroughForm(operator, DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD)
    await operator.waitForURL((u) => u.pathname === '/lab')
    const row = byTest(operator, `job-row-${reprint.id}`)
    await expect.poll(() => row.count()).toBe(1)
    expect(await row.innerText()).toMatch(/Reprint[\s\S]*Torn off in a practice match/)
    expect(await row.innerText()).toMatch(/Queued/)

    // The state filter lives in the address: queued jobs only, so the applied first cut leaves the list.
    await operator.locator('[data-test="queue-filters"] select[name="state"]').selectOption('queued')
    await operator.waitForURL((u) => u.searchParams.get('state') === 'queued')
    await expect.poll(() => byTest(operator, `job-row-${jobId}`).count()).toBe(0)
    expect(await byTest(operator, `job-row-${reprint.id}`).count()).toBe(1)
    await screenshot(operator, 'lab-queue-reprint')
  })
})
