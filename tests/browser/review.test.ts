import { describe, expect, it, inject } from 'vitest'
import { setupBrowser, signInThroughForm, tabletPage, screenshot } from '../support/browser'
import { signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { waitForMail } from '../support/mail'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

describe('submitting for review from the artwork page', () => {
  it('a student submits revision 1; the status reads "In review" and the mentors are mailed', async () => {
    const wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const title = `Review me ${Date.now()}`
    const up = await uploadArtwork(student, { file: await drawing('png', 500, 300), title, teamId: wrens, widthMm: 80 })
    expect(up.status).toBe(201)

    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.goto(new URL(`/artworks/${up.body.artwork.id}`, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    await page.locator('[data-test="submit-review"]').click()
    await expect.poll(() => page.locator('main').textContent()).toContain('In review')
    await waitForMail(DEMO_ACCOUNTS.mentor.email, new RegExp(`Review requested: ${title}`))
    await screenshot(page, 'artwork-submitted')
    await page.close()
  })
})
