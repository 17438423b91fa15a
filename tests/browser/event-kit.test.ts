// The robot page: a decal marked as needed at events on the placement form, the mark on its
// card, and the event kit queued from the page as one batch per film, said in words.
import { describe, expect, it } from 'vitest'
import { setupBrowser, signedInPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { approvedOnRobot } from '../support/scenario'
import { testDb } from '../support/db'

await setupBrowser()

describe('the event kit on the robot page', () => {
  it('a mentor marks a decal as needed at events and queues the kit; the page says which batch took it', { timeout: 120_000 }, async () => {
    const { robotId, revisionId, film } = await approvedOnRobot('Kit decal')
    const page = await signedInPage(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD, `/robots/${robotId}`)
    const byTest = (t: string) => page.locator(`[data-test="${t}"]`)
    // Nothing is marked yet: the kit has nothing to queue.
    await expect.poll(() => byTest('event-kit').isDisabled(), { timeout: 15_000 }).toBe(true)

    const form = byTest('placement-form')
    await form.locator('select[name="revisionId"]').selectOption(String(revisionId))
    await form.locator('select[name="filmId"]').selectOption(String(film.id))
    await form.locator('input[name="spot"]').fill('driver station')
    await form.locator('input[name="spares"]').fill('2')
    await byTest('needed-at-events').check()
    await form.locator('button[type="submit"]').click()

    const placement = () => testDb().selectFrom('placement').select(['id', 'needed_at_events']).where('robot_id', '=', robotId).executeTakeFirst()
    await expect.poll(placement, { timeout: 15_000 }).toBeTruthy()
    const placed = (await placement())!
    expect(placed.needed_at_events).toBe(true)
    const card = byTest(`placement-${placed.id}`)
    await card.waitFor({ timeout: 15_000 })
    expect(await byTest(`needed-at-events-${placed.id}`).innerText()).toMatch(/Needed at events/)

    await expect.poll(() => byTest('event-kit').isDisabled()).toBe(false)
    expect(await byTest('event-kit').innerText()).toMatch(/spares of 1 placement/)
    await byTest('event-kit').click()
    await expect.poll(() => byTest('notice').innerText(), { timeout: 15_000 })
      .toMatch(new RegExp(`The event kit is in the cut queue: 1 reprint job, 2 copies in all, as batch \\d+ in ${film.name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} \\(2 copies: job \\d+\\)\\.`))
    const batchId = Number((await byTest('notice').innerText()).match(/batch (\d+)/)![1])
    const jobs = await testDb().selectFrom('job').select(['id', 'kind', 'quantity']).where('batch_id', '=', batchId).execute()
    expect(jobs.map((j) => [j.kind, j.quantity])).toEqual([['reprint', 2]])
    await screenshot(page, 'robot-event-kit')
    await page.close()
  })
})
