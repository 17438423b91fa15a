// Every page, for every role, at a desktop and a phone width, checked with axe-core against
// WCAG 2.0, 2.1 and 2.2 levels A and AA (the rule tags axe-core documents for them): no
// serious or critical finding; then, in the same visit, focus walked through every control
// (target size and nothing focused under a sticky bar, tests/support/focus-walk.ts). A
// screenshot of each page at each width is kept.
import { describe } from 'vitest'
import { AxeBuilder } from '@axe-core/playwright'
import type { Page } from 'playwright-core'
import { setupBrowser, screenshot } from '../support/browser'
import { walkFocus } from '../support/focus-walk'
import { checkEveryPage } from '../support/pages'

await setupBrowser()

const WCAG_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa']

/** Findings of axe-core that block someone (serious or critical), in a form a failure message can show. */
async function blockingFindings(page: Page) {
  // A message's own HTML is shown in a sandboxed frame without scripts, which axe-core cannot
  // enter; it is the mail's markup, not the app's, so it stays out of the check.
  const result = await new AxeBuilder({ page }).withTags(WCAG_TAGS).exclude('iframe[sandbox]').analyze()
  return result.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => ({ rule: v.id, impact: v.impact, help: v.help, where: v.nodes.slice(0, 4).map((n) => n.target.join(' ')) }))
}

describe('accessibility of every page', () => {
  checkEveryPage('Checked page', async (page, shot) => {
    await screenshot(page, shot)
    const axe = await blockingFindings(page)
    // After axe-core: the walk moves focus and scrolls.
    const focus = await walkFocus(page)
    return [...axe, ...focus.map((problem) => ({ focusWalk: problem }))]
  })
})
