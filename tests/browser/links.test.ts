import { describe, expect, it } from 'vitest'
import { setupBrowser, signInThroughForm, tabletPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { uniqueEmail } from '../support/client'
import { makeUser } from '../support/people'
import { linkIn, waitForMail } from '../support/mail'

await setupBrowser()

describe('invitation and reset, end to end in the browser', () => {
  it('a mentor invites a student; the student follows the e-mailed link, sets a password and lands home', async () => {
    const mentor = await tabletPage('')
    await signInThroughForm(mentor, DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    await mentor.waitForURL((u) => u.pathname === '/program')
    await mentor.goto(new URL('/people', mentor.url()).toString(), { waitUntil: 'networkidle' })
    const email = uniqueEmail('browser.invite')
    const form = mentor.locator('[data-test="invite-form"]')
    await form.locator('input[name="name"]').fill('Saoirse Whitlock-Ibe')
    await form.locator('input[name="email"]').fill(email)
    await form.locator('select[name="role"]').selectOption('student')
    await form.locator('select[name="teamId"]').selectOption({ label: 'Copper Wrens' })
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => mentor.locator('main').textContent()).toContain(email)
    await screenshot(mentor, 'people-after-invite')

    const link = linkIn(await waitForMail(email, /invited/), '/invitations/')
    const guest = await tabletPage('')
    await guest.goto(link, { waitUntil: 'networkidle' })
    await expect.poll(() => guest.locator('main').textContent()).toMatch(/Copper Wrens/)
    const accept = guest.locator('[data-test="accept-form"]')
    await accept.locator('input[name="password"]').fill('saoirse-password-1')
    await accept.locator('input[name="confirm"]').fill('saoirse-password-1')
    await accept.locator('button[type="submit"]').click()
    await guest.waitForURL((u) => u.pathname === '/studio')
    await expect.poll(() => guest.locator('[data-test="me-name"]').first().textContent()).toContain('Saoirse Whitlock-Ibe')

    // The same link again: a clear page that offers a way forward.
    const again = await tabletPage('')
    await again.goto(link, { waitUntil: 'networkidle' })
    await expect.poll(() => again.locator('main').textContent()).toMatch(/expired or was already used/)
    expect(await again.locator('a[href="/reset"], a[href="/sign-in"]').count()).toBeGreaterThan(0)
    await Promise.all([mentor.close(), guest.close(), again.close()])
  })

  it('anyone resets a forgotten password by e-mail', async () => {
    const page = await tabletPage('/sign-in')
    await page.locator('a[href="/reset"]').first().click()
    await page.waitForURL((u) => u.pathname === '/reset')
    const form = page.locator('[data-test="reset-request-form"]')
    const person = await makeUser('Absent Minded', { team: 'Copper Wrens', role: 'designer' })
    await form.locator('input[name="email"]').fill(person.email)
    await form.locator('button[type="submit"]').click()
    await expect.poll(() => page.locator('[data-test="notice"]').textContent()).toMatch(/If an account exists/)
    const link = linkIn(await waitForMail(person.email, /Reset/), '/reset/')
    await page.goto(link, { waitUntil: 'networkidle' })
    const reset = page.locator('[data-test="reset-form"]')
    // Mismatched confirmation is caught in the form.
    await reset.locator('input[name="password"]').fill('designer-new-pass')
    await reset.locator('input[name="confirm"]').fill('designer-other-pass')
    await reset.locator('button[type="submit"]').click()
    await expect.poll(() => page.locator('[data-test="error-confirm"]').count()).toBeGreaterThan(0)
    await reset.locator('input[name="confirm"]').fill('designer-new-pass')
    await reset.locator('button[type="submit"]').click()
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.close()
  })
})
