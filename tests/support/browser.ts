// Browser tests drive Debian's Chromium through playwright-core, via @nuxt/test-utils
// pointed at the one app server the test run started (no build per file).
import { mkdirSync } from 'node:fs'
import path from 'node:path'
import { inject } from 'vitest'
import { createPage, setup } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'

export const CHROMIUM = '/usr/bin/chromium'
export const ARTEFACTS = path.resolve('test-results/screenshots')

export async function setupBrowser(): Promise<void> {
  await setup({
    host: inject('baseUrl'),
    browser: true,
    browserOptions: {
      type: 'chromium',
      launch: {
        executablePath: CHROMIUM,
        // Flags for a headless run as root on a machine without outside network.
        args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
      },
    },
  })
}

/** A fresh page (its own cookies) at a tablet-sized window. */
export async function tabletPage(path = '/'): Promise<Page> {
  const page = await createPage(undefined, { viewport: { width: 820, height: 1100 } })
  if (path) await page.goto(new URL(path, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
  return page
}

export async function signInThroughForm(page: Page, email: string, password: string): Promise<void> {
  await page.goto(new URL('/sign-in', inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
  const form = page.locator('[data-test="sign-in-form"]')
  await form.locator('input[name="email"]').fill(email)
  await form.locator('input[name="password"]').fill(password)
  await form.locator('button[type="submit"]').click()
}

/** A fresh page signed in through the form, then at `path`. */
export async function signedInPage(email: string, password: string, path: string): Promise<Page> {
  const page = await tabletPage('')
  await signInThroughForm(page, email, password)
  await page.waitForURL((u) => u.pathname !== '/sign-in')
  await page.goto(new URL(path, page.url()).toString(), { waitUntil: 'networkidle' })
  return page
}

export async function screenshot(page: Page, name: string): Promise<void> {
  mkdirSync(ARTEFACTS, { recursive: true })
  await page.screenshot({ path: path.join(ARTEFACTS, `${name}.png`), fullPage: true })
}

/** Follows a link of the shell's navigation (data-test `nav-<item>`), opening its menus as a person would. */
export async function followNav(page: Page, item: string): Promise<void> {
  const link = page.locator(`[data-test="nav-${item}"]`).first()
  const menu = page.locator('[data-test="nav-menu"]')
  if (!(await link.isVisible()) && await menu.isVisible()) await menu.click()
  const group = page.locator('[data-test="nav-group-program"]')
  if (!(await link.isVisible()) && await group.isVisible()) await group.click()
  await link.click()
}
