import { beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { screenshot, setupBrowser, signedInPage } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { signedIn, type ApiClient } from '../support/client'

await setupBrowser()

// Number plates in the browser: a mentor chooses the competition's rules, a student makes a
// plate on the team page and sees it at real size, a mentor places it with a side, and the
// robot page checks the robot in sentences and queues the event kit. The number is invented.

const stamp = Date.now().toString(36)
const NUMBER = '3141B'

let mentorApi: ApiClient
let wrens: number
let robotId: number
const films = {} as Record<'white' | 'red', { id: number; name: string }>

const byTest = (page: Page, test: string) => page.locator(`[data-test="${test}"]`)

const as = (who: 'mentor' | 'student', path: string): Promise<Page> => signedInPage(DEMO_ACCOUNTS[who].email, DEMO_PASSWORD, path)

beforeAll(async () => {
  mentorApi = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
  wrens = (await mentorApi.get('/api/me')).body.teams.find((t: { name: string }) => t.name === 'Copper Wrens').id
  for (const [key, colour, hex] of [['white', 'Snow white', '#fbfbfb'], ['red', 'Poppy red', '#c2262e']] as const) {
    const name = `Plate film ${colour} ${stamp}`
    const r = await mentorApi.post('/api/films', {
      name, polymerCode: 'PET', colour, colourHex: hex, opacity: 'opaque', thicknessMm: 0.08, sheetWidthMm: 300, sheetHeightMm: 300,
      minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1, sheetsOnHand: 10,
    })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    films[key] = { id: r.body.id, name }
  }
  const robot = await mentorApi.post('/api/robots', { teamId: wrens, name: `Skua ${stamp}`, season: '2024–25' })
  expect(robot.status, JSON.stringify(robot.body)).toBe(201)
  robotId = robot.body.id
})

describe('number plates in the browser', () => {
  let created: { title: string; revisionId: number }[] = []

  it('a mentor follows a shipped preset on the rules page and it is in use', async () => {
    const page = await as('mentor', '/program')
    await byTest(page, 'rules-link').click()
    await page.waitForURL((u) => u.pathname === '/rules')
    await byTest(page, 'follow-v5rc-2024-25').click()
    await expect.poll(() => byTest(page, 'notice').innerText(), { timeout: 10_000 }).toMatch(/The program now follows “VEX V5 Robotics Competition 2024–25”/)
    const inUse = page.locator('li', { has: byTest(page, 'profile-in-use') })
    expect(await inUse.innerText()).toMatch(/R10 \(from this issue\)/)
    expect(await inUse.innerText()).toMatch(/113\.79 mm \(4\.48 in\) × 62\.99 mm \(2\.48 in\)/)
    await screenshot(page, 'plates-rules')
  })

  it('a student previews a plate at real size on the team page and makes it, one artwork of two layers', async () => {
    const page = await as('student', `/teams/${wrens}`)
    const section = byTest(page, 'team-plates')
    expect(await section.innerText()).toMatch(/VEX V5 Robotics Competition, season 2024–25/)
    expect(await section.innerText()).toMatch(/the current manual decides/)
    const form = byTest(page, 'plate-form')
    // The demo team's number ("HL-1") is not plate-shaped, so the field starts empty.
    expect(await form.locator('input[name="teamNumber"]').inputValue()).toBe('')
    await form.locator('input[name="teamNumber"]').fill(NUMBER)
    await form.locator('select[name="backgroundColour"]').selectOption('blue')
    await byTest(page, 'plate-preview').click()
    const svg = byTest(page, 'plate-svg')
    // The server reads the font on its first plate: allow a busy machine its time, and keep a picture if it never comes.
    await svg.waitFor({ timeout: 15_000 }).catch(() => screenshot(page, 'plates-preview-failed'))
    await expect.poll(() => svg.count(), { timeout: 1_000, message: 'the preview (see the screenshot plates-preview-failed)' }).toBe(1)
    expect(await byTest(page, 'plate-facts').innerText()).toMatch(/background in blue, numerals in white/)
    // Real size: CSS millimetres, 96 px per 25.4 mm (CSS Values and Units Level 3, absolute lengths).
    const widthMm = Number((await svg.getAttribute('width'))!.replace('mm', ''))
    expect(widthMm).toBeGreaterThanOrEqual(4.48 * 25.4)
    const box = (await svg.boundingBox())!
    expect(Math.abs(box.width - (widthMm * 96) / 25.4)).toBeLessThan(1)
    expect(await svg.locator('[data-layer="numerals"] path').count()).toBeGreaterThan(0)
    await screenshot(page, 'plates-preview')

    await byTest(page, 'plate-make').click()
    const made = byTest(page, 'plate-created')
    // Both layers are measured from their stored vectors first: allow the time a busy machine takes.
    await expect.poll(() => made.count(), { timeout: 30_000 }).toBe(1)
    expect(await made.locator('a').allInnerTexts()).toEqual([`Plate ${NUMBER}: white numerals on blue`])

    // The artwork page says what the plate is and shows no source or prepared bitmap.
    await made.locator('a').click()
    await page.waitForURL((u) => u.pathname.startsWith('/artworks/'))
    await expect.poll(() => byTest(page, 'panel-plate').count()).toBe(1)
    expect(await byTest(page, 'panel-plate').innerText()).toMatch(/A plate of 2 layers, bottom first: blue background, then white numerals/)
    expect(await byTest(page, 'panel-source').count()).toBe(0)
    expect(await byTest(page, 'open-bench').count()).toBe(0)
    expect(await byTest(page, 'plate-measured').innerText()).toMatch(/measured on the stored vector/)

    const list = (await mentorApi.get(`/api/artworks?teamId=${wrens}&q=${encodeURIComponent(`Plate ${NUMBER}`)}`)).body.items as { id: number; title: string; latestRevision: { id: number } }[]
    created = list.map((a) => ({ title: a.title, revisionId: a.latestRevision.id }))
    expect(created).toHaveLength(1)
  })

  it('once approved, a mentor places the plate on the front with a film per layer; the robot page checks it in sentences', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    for (const c of created) {
      expect((await student.post(`/api/revisions/${c.revisionId}/submit`)).status).toBe(200)
      expect((await mentorApi.post(`/api/revisions/${c.revisionId}/review`, { decision: 'approve' })).status).toBe(200)
    }
    const page = await as('mentor', `/robots/${robotId}`)
    const form = byTest(page, 'placement-form')
    await expect.poll(() => form.count()).toBe(1)
    await form.locator('select[name="revisionId"]').selectOption(String(created[0]!.revisionId))
    // One film per layer, each layer shown with its colour; the films nearest in colour come first.
    const layers = byTest(page, 'layer-films')
    await expect.poll(() => layers.count()).toBe(1)
    expect(await byTest(page, 'layer-film-0').innerText()).toMatch(/Layer 1 of 2:\s*blue background/)
    expect(await byTest(page, 'layer-film-1').innerText()).toMatch(/Layer 2 of 2:\s*white numerals/)
    // A film is suggested for each layer (nearest by CIEDE2000 among the program's cleared films,
    // which other tests of the run add to; the ranking itself is checked in
    // tests/unit/server/robots/film-colours.test.ts); this test then takes its own.
    expect(await layers.locator('select[name="layerFilm1"]').inputValue()).not.toBe('')
    await layers.locator('select[name="layerFilm1"]').selectOption(String(films.white.id))
    await layers.locator('select[name="layerFilm0"]').selectOption(String(films.red.id))
    await form.locator('select[name="side"]').selectOption('front')
    await form.locator('input[name="spot"]').fill('front panel')
    await form.locator('input[name="widthMm"]').fill('140')
    await screenshot(page, 'plates-layer-films')
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'placement-side').count(), { timeout: 10_000 }).toBe(1)
    expect(await page.locator('[data-test^="placement-layers-"]').innerText()).toMatch(/blue background:\s*Plate film Poppy red[\s\S]*white numerals:\s*Plate film Snow white/)

    const results = byTest(page, 'plate-check-results')
    // Worked by hand: the V5RC profile asks for plates on two opposite sides; the front has one, so the back lacks one.
    await expect.poll(() => results.locator('[data-rule="sides"]').innerText(), { timeout: 10_000 })
      .toMatch(/Not met\s+Sides\. No plate on the back: the rules ask for two opposite sides\. \(R10\)/)
    expect(await results.locator('[data-rule="numeral-colour"]').innerText()).toMatch(/Passed\s+Numeral colour\. The numerals are white on every placed plate\./)
    expect(await results.locator('[data-rule="background"]').innerText()).toMatch(/Passed/)
    expect(await results.locator('[data-rule="alliance-colours"]').getAttribute('data-passed')).toBe('false')
    // The film decides the colour: the background layer went on in red film, so the red plates lack the back and there is no blue plate.
    expect(await results.locator('[data-rule="alliance-colours"]').innerText())
      .toMatch(/Not met\s+Alliance colours\. No red plate on the back; no blue plate placed: the rules ask for red and blue plates, each on two opposite sides\. \(R10\)/)
    await screenshot(page, 'plates-robot-check')

    // The job of the numerals' layer says in which order the layers go on, each step drawn.
    const robot = (await mentorApi.get(`/api/robots/${robotId}`)).body as { placements: { layers: unknown[]; jobs: { id: number; layer: number | null }[] }[] }
    const numeralsJob = robot.placements.find((p) => p.layers.length === 2)!.jobs.find((j) => j.layer === 1)!.id
    const jobPage = await as('mentor', `/lab/jobs/${numeralsJob}`)
    const order = byTest(jobPage, 'job-application-order')
    await expect.poll(() => order.count()).toBe(1)
    expect(await byTest(jobPage, 'apply-step-0').innerText()).toMatch(/Step 1: layer 1, blue background[\s\S]*press it down first/)
    expect(await byTest(jobPage, 'apply-step-1').innerText()).toMatch(/Step 2: layer 2, white numerals \(this job\)[\s\S]*registration marks/)
    expect(await byTest(jobPage, 'apply-step-1').getAttribute('aria-current')).toBe('step')
    expect(await byTest(jobPage, 'apply-step-1').locator('[role="img"] > div').count()).toBe(2)
    const layerSvg = await jobPage.request.get(new URL(`/api/jobs/${numeralsJob}/layers/1/vector.svg`, jobPage.url()).href)
    expect(layerSvg.status()).toBe(200)
    expect(await layerSvg.text()).toMatch(/<svg[^>]*width="[\d.]+mm"/)
    await screenshot(jobPage, 'job-application-order')
    await jobPage.close()

    await byTest(page, 'event-kit').click()
    await expect.poll(() => byTest(page, 'notice').innerText(), { timeout: 10_000 }).toMatch(/The event kit is in the cut queue: \d+ reprint jobs?/)
  })
})
