// The review loop, where-is and the activity filters as people see them in the browser.
import { describe, expect, it, inject } from 'vitest'
import { getBrowser } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, screenshot } from '../support/browser'
import { signedIn } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { approvedOnRobot, teamId } from '../support/scenario'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

const url = (p: string) => new URL(p, inject('baseUrl')).toString()

async function signedInPage(role: keyof typeof DEMO_ACCOUNTS, width = 1280): Promise<Page> {
  const context = await (await getBrowser()).newContext({ viewport: { width, height: 900 } })
  const page = await context.newPage()
  await signInThroughForm(page, DEMO_ACCOUNTS[role].email, DEMO_PASSWORD)
  await page.waitForURL((u) => u.pathname !== '/sign-in')
  return page
}

describe('the review loop in the browser', () => {
  it('after a send-back the artwork shows the comment; the reviewer sees that a newer revision exists', async () => {
    const designer = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const title = `Browser loop ${Date.now()}`
    const up = await uploadArtwork(designer, { file: await drawing('png', 500, 300), title, teamId: await teamId(), widthMm: 70 })
    const r1 = up.body.revision.id as number
    const artworkId = up.body.artwork.id as number
    await designer.post(`/api/revisions/${r1}/submit`)
    const comment = 'Round the corners of the wing a little more.'
    await mentor.post(`/api/revisions/${r1}/review`, { decision: 'send-back', comment })
    await designer.post(`/api/artworks/${artworkId}/revisions`, { settings: {}, widthMm: 72 })

    const student = await signedInPage('student')
    await student.goto(url(`/artworks/${artworkId}`), { waitUntil: 'networkidle' })
    // The page opens on revision 2, the comment about revision 1 is right there.
    await expect.poll(() => student.locator('[data-test="shown-revision"]').innerText()).toMatch(/Revision 2/)
    expect(await student.locator('[data-test="sent-back-comment"]').innerText()).toContain(comment)
    expect(await student.locator('[data-test="sent-back"]').innerText()).toMatch(/sent revision 1 back.*Revision 2 was made since/s)
    await screenshot(student, 'artwork-sent-back-comment')
    await student.context().close()

    await designer.post(`/api/revisions/${r1}/submit`)
    const page = await signedInPage('mentor')
    await page.goto(url('/reviews'), { waitUntil: 'networkidle' })
    await expect.poll(() => page.locator(`[data-test="review-newer-${r1}"]`).innerText()).toMatch(/A newer revision exists \(the latest is revision 2\)/)
    await screenshot(page, 'review-card-newer')
    await page.context().close()
  })

  it('the artwork page lists the robot, spot, film and job its decal is on', async () => {
    const { mentor, artworkId, revisionId, robotId, film } = await approvedOnRobot('Where is')
    const placed = await mentor.post('/api/placements', { robotId, revisionId, filmId: film.id, spot: 'left fork', widthMm: 40, quantity: 1, spares: 2 })
    const page = await signedInPage('student', 390)
    await page.goto(url(`/artworks/${artworkId}`), { waitUntil: 'networkidle' })
    const where = page.locator(`[data-test="where-${placed.body.id}"]`)
    await expect.poll(() => where.innerText()).toMatch(/left fork/)
    const words = await where.innerText()
    expect(words).toContain(film.name)
    expect(words).toMatch(new RegExp(`Job ${placed.body.jobs[0].id}`))
    expect(words).toMatch(/First cut, 3 copies:\s*Queued/)
    expect(await where.locator(`a[href="/robots/${robotId}"]`).count()).toBe(1)
    await screenshot(page, 'artwork-where-placed-390')
    await page.context().close()
  })

  it('a mentor filters the activity by kind, and a wide table on a phone scrolls by keyboard with a cue', async () => {
    const page = await signedInPage('mentor', 390)
    await page.goto(url('/activity'), { waitUntil: 'networkidle' })
    await page.locator('select[name="kind"]').selectOption('accounts')
    await page.waitForURL((u) => u.searchParams.get('kind') === 'accounts')
    await expect.poll(() => page.locator('[data-test="audit-table"] tbody tr').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-action')))).not.toContain('upload')
    const actions = await page.locator('[data-test="audit-table"] tbody tr').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-action')))
    expect(actions.length).toBeGreaterThan(0)
    expect(actions.every((a) => ['sign-in', 'sign-in-failed', 'invite', 'accept-invitation', 'request-reset', 'reset-password', 'set-first-password', 'change-role', 'rename-person', 'deactivate', 'reactivate', 'sign-out-everywhere', 'withdraw-invitation', 'create-mentor'].includes(a!))).toBe(true)
    // No codes in the table: the action is told in words.
    expect(await page.locator('[data-test="audit-table"]').innerText()).not.toMatch(/\bsign-in\b/)

    const region = page.locator('[data-test="scroll-table"]').first()
    expect(await region.getAttribute('tabindex')).toBe('0')
    expect(await region.getAttribute('role')).toBe('region')
    expect(await region.getAttribute('aria-label')).toBe('Activity')
    await expect.poll(() => page.locator('[data-test="scroll-cue"]').count()).toBe(1)
    await region.focus()
    await page.keyboard.press('ArrowRight')
    await page.keyboard.press('ArrowRight')
    await expect.poll(() => region.evaluate((el) => el.scrollLeft)).toBeGreaterThan(0)
    await screenshot(page, 'activity-filtered-390')
    await page.context().close()
  })

  it('People and Mail search as one types', async () => {
    const page = await signedInPage('mentor')
    await page.goto(url('/people'), { waitUntil: 'networkidle' })
    await page.locator('[data-test="people-search"]').fill('sprockets juniper')
    await expect.poll(() => page.locator('[data-test="people-table"] tbody tr').count()).toBe(1)
    expect(await page.locator('[data-test="people-table"] tbody').innerText()).toContain('Juniper Ashgrove')
    await page.locator('[data-test="people-search"]').fill('nobody-by-this-name')
    await expect.poll(() => page.locator('[data-test="people-none"]').count()).toBe(1)

    await page.goto(url('/mail'), { waitUntil: 'networkidle' })
    const rows = page.locator('[data-test="mail-table"] tbody tr')
    await expect.poll(() => rows.count()).toBeGreaterThan(0)
    await page.locator('[data-test="mail-search"]').fill('review requested')
    await expect.poll(async () => (await rows.allInnerTexts()).every((t) => /Review requested/i.test(t))).toBe(true)
    await page.context().close()
  })
})
