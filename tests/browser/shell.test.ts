import { describe, expect, it, inject } from 'vitest'
import { getBrowser } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, screenshot } from '../support/browser'
import { signedIn } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { teamId } from '../support/scenario'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

async function mentorAt(width: number): Promise<Page> {
  const context = await (await getBrowser()).newContext({ viewport: { width, height: 800 } })
  const page = await context.newPage()
  await signInThroughForm(page, DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
  await page.waitForURL((u) => u.pathname === '/program')
  await page.locator('[data-test="sign-out"]').waitFor()
  return page
}

/** Whatever in the header sticks out of the window, or wraps a one-line control onto two. */
function headerProblems(page: Page) {
  return page.evaluate(() => {
    const problems: string[] = []
    if (document.documentElement.scrollWidth > window.innerWidth) problems.push(`page ${document.documentElement.scrollWidth} px wide`)
    for (const el of document.querySelectorAll<HTMLElement>('#shell-header a, #shell-header button')) {
      const box = el.getBoundingClientRect()
      if (box.width === 0) continue // folded away in a closed menu
      if (box.right > window.innerWidth + 0.5 || box.left < -0.5) problems.push(`${el.textContent?.trim()} outside the window`)
      if (box.height > 44) problems.push(`${el.textContent?.trim()} on two lines`)
    }
    const name = document.querySelector<HTMLElement>('[data-test="me-name"]')
    if (name && name.offsetWidth > 0 && name.scrollWidth > name.clientWidth) problems.push('name cut short')
    return problems
  })
}

describe('the shell around every page', () => {
  for (const width of [360, 390, 820, 1280, 1440, 1920]) {
    it(`the mentor's bar fits at ${width} px, with every page one menu away`, async () => {
      const page = await mentorAt(width)
      expect(await headerProblems(page)).toEqual([])
      const menu = page.locator('[data-test="nav-menu"]')
      const group = page.locator('[data-test="nav-group-program"]')
      if (await menu.isVisible()) await menu.click()
      else await group.click()
      for (const item of ['reviews', 'artworks', 'robots', 'lab', 'program', 'teams', 'people', 'films', 'materials', 'activity', 'mail']) {
        expect(await page.locator(`[data-test="nav-${item}"]`).isVisible(), item).toBe(true)
      }
      expect(await headerProblems(page)).toEqual([])
      await screenshot(page, `shell-mentor-menu-open-${width}`)
      await page.context().close()
    })
  }

  it('the Program menu opens and closes by keyboard, and Escape gives focus back to its button', async () => {
    const page = await mentorAt(1440)
    const group = page.locator('[data-test="nav-group-program"]')
    await group.focus()
    expect(await group.getAttribute('aria-expanded')).toBe('false')
    expect(await page.locator('[data-test="nav-people"]').isVisible()).toBe(false)
    await page.keyboard.press('Enter')
    expect(await group.getAttribute('aria-expanded')).toBe('true')
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe('nav-program')
    await page.keyboard.press('Escape')
    expect(await group.getAttribute('aria-expanded')).toBe('false')
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe('nav-group-program')
    // Open again and follow a link with the keyboard: the menu closes on the new page.
    await page.keyboard.press('Enter')
    await page.locator('[data-test="nav-people"]').focus()
    await page.keyboard.press('Enter')
    await page.waitForURL((u) => u.pathname === '/people')
    await expect.poll(() => group.getAttribute('aria-expanded')).toBe('false')
    expect(await group.getAttribute('class')).toContain('nav-link-current')
    await page.context().close()
  })

  it('the phone menu opens from its button and closes with Escape', async () => {
    const page = await mentorAt(390)
    const menu = page.locator('[data-test="nav-menu"]')
    await menu.focus()
    await page.keyboard.press('Enter')
    expect(await menu.getAttribute('aria-expanded')).toBe('true')
    expect(await page.locator('[data-test="nav-activity"]').isVisible()).toBe(true)
    await page.keyboard.press('Escape')
    expect(await menu.getAttribute('aria-expanded')).toBe('false')
    expect(await page.locator('[data-test="nav-activity"]').isVisible()).toBe(false)
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe('nav-menu')
    await page.context().close()
  })

  it('a student sent away from a mentor page reads why; the sentence goes with the next page', async () => {
    const context = await (await getBrowser()).newContext({ viewport: { width: 390, height: 800 } })
    const page = await context.newPage()
    await signInThroughForm(page, DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    await page.waitForURL((u) => u.pathname === '/studio')
    await page.goto(new URL('/activity', inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    expect(new URL(page.url()).pathname).toBe('/studio')
    await expect.poll(() => page.locator('[data-test="refusal"]').textContent()).toMatch(/is for the program’s mentors/)
    await screenshot(page, 'refused-student-390')
    await page.goto(new URL('/robots', inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="refusal"]').count()).toBe(0)
    await context.close()
  })

  it('on the tuning bench, a control reached by keyboard is never hidden under the bar stuck to the top', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const up = await uploadArtwork(student, { file: await drawing('png', 500, 300), title: `Focus check ${Date.now()}`, teamId: await teamId(), widthMm: 60 })
    const page = await mentorAt(390)
    await page.goto(new URL(`/artworks/${up.body.artwork.id}/bench`, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    const bar = page.locator('[data-sticky-bar]')
    await bar.waitFor()
    // Every control below the bar in turn: scroll it to just under the top edge, then reach it
    // with Shift+Tab from the control after it.
    const hidden = await page.evaluate(async () => {
      const barEl = document.querySelector<HTMLElement>('[data-sticky-bar]')!
      const controls = [...document.querySelectorAll<HTMLElement>('main input, main button, main select, main a[href]')]
        .filter((el) => el.offsetParent && !barEl.contains(el) && !(el as HTMLButtonElement).disabled)
      return controls.slice(0, Math.min(12, controls.length - 1)).map((el) => ({
        label: el.getAttribute('name') ?? el.textContent?.trim().slice(0, 30) ?? el.tagName,
        top: el.getBoundingClientRect().top + window.scrollY,
      }))
    })
    const problems: string[] = []
    for (const [i, c] of hidden.entries()) {
      await page.evaluate((y) => window.scrollTo(0, y), Math.max(0, c.top - 8))
      await page.evaluate((n) => {
        const barEl = document.querySelector<HTMLElement>('[data-sticky-bar]')!
        const controls = [...document.querySelectorAll<HTMLElement>('main input, main button, main select, main a[href]')]
          .filter((el) => el.offsetParent && !barEl.contains(el) && !(el as HTMLButtonElement).disabled)
        controls[n + 1]!.focus({ preventScroll: true })
      }, i)
      await page.keyboard.press('Shift+Tab')
      const hiddenOne = await page.evaluate(() => {
        const focused = document.activeElement!.getBoundingClientRect()
        const barBox = document.querySelector<HTMLElement>('[data-sticky-bar]')!.getBoundingClientRect()
        // Success criterion 2.4.11 (AA) asks that the focused control is not entirely hidden.
        return focused.bottom > barBox.bottom + 1 || focused.bottom <= barBox.top ? null : (document.activeElement!.getAttribute('aria-label') ?? document.activeElement!.textContent?.trim().slice(0, 30) ?? '')
      })
      if (hiddenOne !== null) problems.push(`${c.label} (focus on ${hiddenOne})`)
    }
    expect(hidden.length).toBeGreaterThan(3)
    expect(problems).toEqual([])
    await page.context().close()
  })
})
