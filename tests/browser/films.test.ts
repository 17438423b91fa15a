import { beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { setupBrowser, signedInPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { signedIn, type ApiClient } from '../support/client'
import { approvedOnRobot } from '../support/scenario'

await setupBrowser()

// The film library in the browser: a mentor adds a film by searching the register, records the
// lab's approval and a delivery; an operator cuts a clear film's test grid and records it; the
// placement form and the job page caution about an untested blue film; a job is cancelled, a
// failed cut recut, and a placement changed and removed.

const stamp = Date.now().toString(36)
const url = (page: Page, path: string) => new URL(path, page.url()).toString()
const byTest = (page: Page, test: string) => page.locator(`[data-test="${test}"]`)
let mentorApi: ApiClient

const as = (who: keyof typeof DEMO_ACCOUNTS, path: string): Promise<Page> => signedInPage(DEMO_ACCOUNTS[who].email, DEMO_PASSWORD, path)

beforeAll(async () => {
  mentorApi = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
})

describe('the film library', () => {
  it('a mentor searches the register: PVC is refused with its reason; a PVC-free vinyl is added, approved with its data sheet, and delivered', async () => {
    const page = await as('mentor', '/films')
    // The demo's PVC film is listed and never cut, saying why.
    const pvcRow = page.locator('[data-test^="film-"]', { hasText: 'Glossy white sign vinyl' }).first()
    expect(await pvcRow.innerText()).toMatch(/Never laser[\s\S]*PVC[\s\S]*Never cut[\s\S]*hydrogen chloride/)

    const form = byTest(page, 'film-form')
    const search = form.locator('[data-test="polymer-search"]')
    await search.fill('cast vinyl')
    await expect.poll(() => byTest(page, 'polymer-refused-PVC').count()).toBe(1)
    expect(await byTest(page, 'polymer-refused-PVC').innerText()).toMatch(/Refused: Contains chlorine: gives off hydrogen chloride/)
    expect(await byTest(page, 'polymer-pick-PVC').count()).toBe(0)
    await search.fill('PVC-free vinyl')
    await byTest(page, 'polymer-pick-PU').click()
    expect(await byTest(page, 'polymer-chosen').innerText()).toMatch(/Polyurethane \(ask the lab\)/)
    const name = `Satin PVC-free film ${stamp}`
    await form.locator('input[name="name"]').fill(name)
    await form.locator('input[name="colour"]').fill('satin green')
    await form.locator('input[name="sheetsOnHand"]').fill('2')
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'notice').count()).toBe(1)
    const row = page.locator('tr', { hasText: name })
    expect(await row.innerText()).toMatch(/Ask the lab[\s\S]*Polyurethane[\s\S]*Needs the lab's approval/)

    await row.locator('a', { hasText: name }).click()
    await page.waitForURL((u) => /^\/films\/\d+$/.test(u.pathname))
    await page.waitForLoadState('networkidle')
    expect(await byTest(page, 'film-refusal').innerText()).toMatch(/needs the lab's approval/)
    await byTest(page, 'approval-form').locator('input[name="safetyDataSheet"]').fill('Maker Y satin PU film, SDS rev. 2')
    await byTest(page, 'approval-form').locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'lab-approval').innerText()).toMatch(new RegExp(`Approved by ${DEMO_ACCOUNTS.mentor.name}[\\s\\S]*judged on Maker Y satin PU film, SDS rev. 2`))

    await byTest(page, 'stock-form').locator('input[name="sheets"]').fill('8')
    await byTest(page, 'stock-form').locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'sheets-on-hand').innerText()).toBe('10 sheets on hand')
    expect(await byTest(page, 'stock-history').innerText()).toMatch(new RegExp(`Delivery[\\s\\S]*\\+8[\\s\\S]*10[\\s\\S]*${DEMO_ACCOUNTS.mentor.name}`))
    await screenshot(page, 'film-page-mentor')
  })

  it('an operator cuts a clear film\'s test grid and records the clean square: the caution goes and the settings change', async () => {
    const created = await mentorApi.post('/api/films', {
      name: `Clear window film ${stamp}`, polymerCode: 'PET', colour: 'clear', colourHex: '#ffffff', opacity: 'clear', thicknessMm: 0.05,
      sheetWidthMm: 300, sheetHeightMm: 200, minFeatureMm: 0.8, laserPowerPct: 50, laserSpeedMmS: 10, laserPasses: 1,
    })
    const page = await as('operator', `/films/${created.body.id}`)
    expect(await byTest(page, 'beam-caution').innerText()).toMatch(/clear film may let a blue diode laser's beam \(about 450 nm\) pass/)
    const grid = byTest(page, 'test-grid')
    await grid.locator('input[name="powerSteps"]').fill('4')
    await grid.locator('input[name="powerFrom"]').fill('40')
    await grid.locator('input[name="powerTo"]').fill('70')
    await expect.poll(() => byTest(page, 'grid-table').innerText()).toMatch(/C: 60 %/)
    expect(await byTest(page, 'grid-svg').getAttribute('href')).toMatch(/test-grid\.svg\?powerFrom=40&powerTo=70&powerSteps=4/)
    await byTest(page, 'test-form').locator('select[name="square"]').selectOption('C4')
    await byTest(page, 'test-form').locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'film-laser').innerText()).toMatch(/60 % · 20 mm\/s · 1 pass/)
    expect(await byTest(page, 'beam-caution').count()).toBe(0)
    expect(await byTest(page, 'film-tests').innerText()).toMatch(new RegExp(`${DEMO_ACCOUNTS.operator.name}[\\s\\S]*C4: 60 %, 20 mm/s`))
    await screenshot(page, 'film-test-grid-operator')
  })

  it('the materials page is the register: PVC never, polyurethane ask the lab, polyester allowed, deferring to the lab\'s rules', async () => {
    const page = await as('student', '/materials')
    expect(await byTest(page, 'materials-never').locator('[data-test="material-PVC"]').innerText()).toMatch(/cast vinyl[\s\S]*hydrogen chloride/)
    expect(await byTest(page, 'materials-ask-the-lab').locator('[data-test="material-PU"]').innerText()).toMatch(/PVC-free vinyl[\s\S]*hydrogen cyanide/)
    expect(await byTest(page, 'materials-allowed').locator('[data-test="material-PET"]').count()).toBe(1)
    expect(await byTest(page, 'caution').innerText()).toMatch(/lab's rules[\s\S]*machine's manual[\s\S]*local codes/)
    expect(await byTest(page, 'blue-beam-note').innerText()).toMatch(/445–455 nm \(common practice\)/)
  })
})

describe('cautions and corrections at the laser', () => {
  it('an untested blue film is cautioned on the placement form, the queue and the job page; the job is cancelled; a failed cut is recut', async () => {
    const s = await approvedOnRobot(`Blue ${stamp}`)
    const page = await as('designer', `/robots/${s.robotId}`)
    const form = byTest(page, 'placement-form')
    await form.locator('select[name="filmId"]').selectOption({ label: 'Deep blue polyester film' })
    await expect.poll(() => byTest(page, 'beam-caution').count()).toBe(1)
    expect(await byTest(page, 'beam-caution').innerText()).toMatch(/blue film may let a blue diode laser's beam/)
    expect(await byTest(page, 'film-facts').innerText()).toMatch(/Allowed[\s\S]*Polyester \(PET\)[\s\S]*Common practice/)
    await form.locator('input[name="spot"]').fill('front bumper')
    await form.locator('input[name="quantity"]').fill('40')
    await form.locator('input[name="spares"]').fill('0')
    await form.locator('input[name="widthMm"]').fill('50')
    // 40 copies need two sheets; the demo keeps three of this film, fewer than the queue may need.
    await expect.poll(() => byTest(page, 'fit-advice').innerText()).toMatch(/40 copies fit on 2 sheets/)
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'notice').count()).toBe(1)
    const jobId = Number(/Job (\d+)/.exec(await byTest(page, 'notice').innerText())![1])

    const blue = (await mentorApi.get('/api/films')).body.find((f: { name: string }) => f.name === 'Deep blue polyester film').id
    const lab = await as('operator', `/lab?filmId=${blue}&state=queued`)
    await expect.poll(() => byTest(lab, `job-beam-${jobId}`).count()).toBe(1)
    expect(await byTest(lab, `job-sheets-${jobId}`).innerText()).toMatch(/2 of 3/)
    await lab.goto(url(lab, `/lab/jobs/${jobId}`), { waitUntil: 'networkidle' })
    expect(await byTest(lab, 'beam-caution').innerText()).toMatch(/blue film/)
    expect(await byTest(lab, 'job-stock').innerText()).toMatch(/Needs 2 sheets of Deep blue polyester film/)
    await screenshot(lab, 'job-page-blue-caution')
    await byTest(lab, 'cancel-job').click()
    await byTest(lab, 'cancel-form').locator('input[name="reason"]').fill('test the film first')
    await byTest(lab, 'confirm-cancel').click()
    await expect.poll(() => byTest(lab, 'job-state').innerText()).toMatch(/Cancelled/)
    expect(await byTest(lab, 'cancel-reason').innerText()).toMatch(new RegExp(`by ${DEMO_ACCOUNTS.operator.name}[\\s\\S]*test the film first`))

    // A job in black film burns; the operator records it and a recut is queued.
    const placed = await mentorApi.post('/api/placements', { robotId: s.robotId, revisionId: s.revisionId, filmId: (await mentorApi.get('/api/films')).body.find((f: { name: string }) => f.name === 'Matte black polyester film').id, spot: 'left side panel', widthMm: 40, quantity: 1, spares: 0 })
    await lab.goto(url(lab, `/lab/jobs/${placed.body.jobs[0].id}`), { waitUntil: 'networkidle' })
    await byTest(lab, 'fail-job').click()
    await byTest(lab, 'fail-form').locator('select[name="failure"]').selectOption('burnt')
    await byTest(lab, 'fail-form').locator('input[name="note"]').fill('flare at a corner')
    await byTest(lab, 'confirm-fail').click()
    await expect.poll(() => byTest(lab, 'job-state').innerText()).toMatch(/Failed/)
    expect(await byTest(lab, 'failure').innerText()).toMatch(/Burnt: flare at a corner/)
    await byTest(lab, 'recut-link').click()
    await lab.waitForURL((u) => /^\/lab\/jobs\/\d+$/.test(u.pathname) && u.pathname !== `/lab/jobs/${placed.body.jobs[0].id}`)
    await expect.poll(() => lab.locator('main').innerText()).toMatch(/Recut of 1 copy[\s\S]*Why: Job \d+ failed \(Burnt: flare at a corner\)/)
  })

  it('a designer changes a placement (more copies are queued, never added to a cut job) and removes it with a reason', async () => {
    const s = await approvedOnRobot(`Edit ${stamp}`)
    const placed = (await mentorApi.post('/api/placements', { robotId: s.robotId, revisionId: s.revisionId, filmId: s.film.id, spot: 'left', widthMm: 40, quantity: 1, spares: 0 })).body
    const page = await as('designer', `/robots/${s.robotId}`)
    await byTest(page, `edit-${placed.id}`).click()
    const edit = byTest(page, 'edit-form')
    await edit.locator('input[name="quantity"]').fill('3')
    await edit.locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'notice').count()).toBe(1)
    expect(await byTest(page, 'notice').innerText()).toMatch(/Job \d+ queued for 2 copies/)
    await expect.poll(() => byTest(page, `placement-jobs-${placed.id}`).innerText()).toMatch(/First cut, 1 copy\s*Queued[\s\S]*More copies, 2 copies\s*Queued/)

    await byTest(page, `remove-${placed.id}`).click()
    await byTest(page, 'remove-form').locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, 'remove-form').locator('[data-test="error-reason"]').count()).toBe(1)
    await byTest(page, 'remove-form').locator('input[name="reason"]').fill('panel replaced')
    await byTest(page, 'remove-form').locator('button[type="submit"]').click()
    await expect.poll(() => byTest(page, `placement-${placed.id}`).count()).toBe(0)
    expect(await byTest(page, 'notice').innerText()).toMatch(/removed from the left[\s\S]*Cancelled job \d+, job \d+/)
  })
})
