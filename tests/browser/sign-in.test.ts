import { describe, expect, it } from 'vitest'
import { followNav, setupBrowser, signInThroughForm, tabletPage, screenshot } from '../support/browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'

await setupBrowser()

const NAV: Record<keyof typeof DEMO_ACCOUNTS, { home: string; shows: string[]; hides: string[] }> = {
  mentor: { home: '/program', shows: ['program', 'reviews', 'artworks', 'robots', 'lab', 'films', 'teams', 'people', 'activity', 'mail', 'materials'], hides: ['studio'] },
  // While the local mail fake is in use, everyone reads their own mail.
  designer: { home: '/studio', shows: ['studio', 'artworks', 'robots', 'films', 'teams', 'materials', 'mail'], hides: ['people', 'activity', 'program', 'reviews', 'lab'] },
  student: { home: '/studio', shows: ['studio', 'artworks', 'robots', 'films', 'teams', 'materials', 'mail'], hides: ['people', 'activity', 'program', 'reviews', 'lab'] },
  operator: { home: '/lab', shows: ['lab', 'robots', 'films', 'teams', 'materials', 'mail'], hides: ['people', 'activity', 'program', 'reviews', 'artworks', 'studio'] },
}

describe('signing in, per role', () => {
  for (const role of Object.keys(NAV) as (keyof typeof NAV)[]) {
    it(`the ${role} lands on ${NAV[role].home} with their own navigation`, async () => {
      const page = await tabletPage('')
      await signInThroughForm(page, DEMO_ACCOUNTS[role].email, DEMO_PASSWORD)
      await page.waitForURL((u) => u.pathname === NAV[role].home)
      await expect.poll(() => page.locator('[data-test="me-name"]').first().textContent()).toContain(DEMO_ACCOUNTS[role].name)
      for (const item of NAV[role].shows) expect(await page.locator(`[data-test="nav-${item}"]`).count(), `nav-${item}`).toBeGreaterThan(0)
      for (const item of NAV[role].hides) expect(await page.locator(`[data-test="nav-${item}"]`).count(), `nav-${item}`).toBe(0)
      await screenshot(page, `home-${role}`)
      if (role === 'operator') {
        const caution = await page.locator('main').textContent()
        expect(caution).toMatch(/extraction/i)
        expect(caution).toMatch(/wavelength/i)
        expect(caution).toMatch(/hydrogen chloride/i)
      }
      if (role !== 'mentor') {
        // What a role may not do is not reachable either: the mentor's page sends them home.
        await page.goto(new URL('/people', page.url()).toString(), { waitUntil: 'networkidle' })
        expect(new URL(page.url()).pathname).toBe(NAV[role].home)
        // …and says why, instead of leaving them to wonder.
        await expect.poll(() => page.locator('[data-test="refusal"]').textContent()).toMatch(/for the program’s mentors.*start page/)
        await followNav(page, 'robots')
        await page.waitForURL((u) => u.pathname === '/robots')
        await expect.poll(() => page.locator('[data-test="refusal"]').count()).toBe(0)
      }
      await page.close()
    })
  }

  it('shows the vague error for a wrong password, inline, and stays on the form', async () => {
    const page = await tabletPage('')
    await signInThroughForm(page, DEMO_ACCOUNTS.student.email, 'definitely-wrong')
    await expect.poll(() => page.locator('[data-test="form-error"]').textContent()).toContain('Wrong e-mail or password.')
    expect(new URL(page.url()).pathname).toBe('/sign-in')
    await page.close()
  })

  it('sends a signed-out visitor to the sign-in page, and back after signing in', async () => {
    const page = await tabletPage('/teams')
    expect(new URL(page.url()).pathname).toBe('/sign-in')
    const form = page.locator('[data-test="sign-in-form"]')
    await form.locator('input[name="email"]').fill(DEMO_ACCOUNTS.mentor.email)
    await form.locator('input[name="password"]').fill(DEMO_PASSWORD)
    await form.locator('button[type="submit"]').click()
    await page.waitForURL((u) => u.pathname === '/teams')
    await page.locator('[data-test="sign-out"]').first().click()
    await page.waitForURL((u) => u.pathname === '/sign-in')
    await page.close()
  })
})
