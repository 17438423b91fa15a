// A placement's card on the robot page speaks as the rest of the app does: its date through
// the one locale-aware formatter (utils/format), its jobs' states with the shared look.
import { describe, expect, it } from 'vitest'
import { JOB_STATE_LABELS } from '../../shared/types/robots'
import { formatWhen } from '../../app/utils/format'
import { jobStateLook } from '../../app/utils/artworks'
import { setupBrowser, signedInPage } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { testDb } from '../support/db'
import { approvedOnRobot } from '../support/scenario'

await setupBrowser()

describe('the placement card', () => {
  it('shows the placing date in the app\'s one format and a queued job as the rest of the app does', { timeout: 90_000 }, async () => {
    const { mentor, robotId, revisionId, film } = await approvedOnRobot('Card formats')
    const placed = await mentor.post('/api/placements', { robotId, revisionId, filmId: film.id, spot: 'front bumper', widthMm: 40, quantity: 1, spares: 1 })
    expect(placed.status, JSON.stringify(placed.body)).toBe(201)
    const row = await testDb().selectFrom('placement').select('created_at').where('id', '=', placed.body.id).executeTakeFirstOrThrow()

    // The browser's own locale differs from the app's (en-US here), so a date formatted by the browser's default would show.
    const page = await signedInPage(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD, `/robots/${robotId}`)
    const at = page.locator(`[data-test="placed-at-${placed.body.id}"]`)
    await at.waitFor({ timeout: 15_000 })
    expect(await at.innerText()).toBe(formatWhen(row.created_at, 'date'))
    const job = page.locator(`[data-test="placement-job-${placed.body.jobs[0].id}"] [data-status]`)
    expect(await job.getAttribute('data-status')).toBe(jobStateLook('queued').kind)
    expect((await job.innerText()).trim()).toBe(JOB_STATE_LABELS.queued)
    await page.close()
  })
})
