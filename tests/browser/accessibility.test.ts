// Every page, for every role, at a desktop and a phone width, checked with axe-core against
// WCAG 2.0, 2.1 and 2.2 levels A and AA (the rule tags axe-core documents for them): no
// serious or critical finding. A screenshot of each page at each width is kept.
import { describe, expect, it, inject } from 'vitest'
import { AxeBuilder } from '@axe-core/playwright'
import { getBrowser } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, signInThroughForm, screenshot } from '../support/browser'
import { signedIn } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { approvedOnRobot, teamId } from '../support/scenario'
import { uploadArtwork } from '../support/upload'

await setupBrowser()

const WIDTHS = [{ name: 'desktop', width: 1440, height: 900 }, { name: 'phone', width: 390, height: 844 }] as const
const ROLES = ['mentor', 'designer', 'student', 'operator'] as const
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

/** A page in a browser context of its own (axe-core's Playwright integration asks for one). */
async function pageAt(width: number, height: number): Promise<Page> {
  const context = await (await getBrowser()).newContext({ viewport: { width, height } })
  return context.newPage()
}

const url = (p: string) => new URL(p, inject('baseUrl')).toString()
const slug = (p: string) => p.replace(/^\//, '').replace(/[^\w-]+/g, '-') || 'start'

async function checkPage(page: Page, path: string, shot: string) {
  await page.goto(url(path), { waitUntil: 'networkidle' })
  await screenshot(page, shot)
  return { path, landedOn: new URL(page.url()).pathname, findings: await blockingFindings(page) }
}

// Pages reached through an id: one of each, made the way people make them.
let detailPaths: string[] = []

describe('accessibility of every page', () => {
  it('arranges an artwork in review, an approved one on a robot with a queued job', async () => {
    const { mentor, artworkId, robotId, revisionId, film } = await approvedOnRobot('Checked page')
    const placed = await mentor.post('/api/placements', { robotId, revisionId, filmId: film.id, spot: 'front bumper', widthMm: 40, quantity: 1, spares: 1 })
    expect(placed.status, JSON.stringify(placed.body)).toBe(201)
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const waiting = await uploadArtwork(student, { file: await drawing('png', 500, 300), title: `Waiting for a look ${Date.now()}`, teamId: await teamId(), widthMm: 70 })
    expect(waiting.status).toBe(201)
    expect((await student.post(`/api/revisions/${waiting.body.revision.id}/submit`)).status).toBe(200)
    const mail = (await mentor.get('/api/mail')).body as { id: number }[]
    detailPaths = [
      `/artworks/${artworkId}`, `/artworks/${artworkId}/bench`, `/artworks/${artworkId}/compare`,
      `/artworks/${waiting.body.artwork.id}`, '/artworks/new',
      `/robots/${robotId}`, `/films/${film.id}`, `/teams/${await teamId()}`, `/lab/jobs/${placed.body.jobs[0].id}`,
      ...(mail[0] ? [`/mail/${mail[0].id}`] : []),
    ]
  })

  for (const size of WIDTHS) {
    it(`the public pages at ${size.width} px`, async () => {
      const page = await pageAt(size.width, size.height)
      const results = []
      for (const path of ['/sign-in', '/reset']) results.push(await checkPage(page, path, `public-${slug(path)}-${size.width}`))
      await page.context().close()
      expect(results.filter((r) => r.findings.length)).toEqual([])
    }, 120_000)

    for (const role of ROLES) {
      it(`every page a ${role} reaches at ${size.width} px`, async () => {
        const page = await pageAt(size.width, size.height)
        await signInThroughForm(page, DEMO_ACCOUNTS[role].email, DEMO_PASSWORD)
        await page.waitForURL((u) => u.pathname !== '/sign-in')
        await page.locator('[data-test="sign-out"]').waitFor()
        // Every page the navigation offers (menus included, open or not), then the pages behind an id.
        const navPaths = await page.locator('header nav a[href^="/"]').evaluateAll((links) => links.map((a) => a.getAttribute('href')!))
        expect(navPaths.length).toBeGreaterThan(2)
        const paths = [...new Set([...navPaths, ...detailPaths])]
        const results = []
        for (const path of paths) results.push(await checkPage(page, path, `${role}-${slug(path)}-${size.width}`))
        await page.context().close()
        expect(results.filter((r) => r.findings.length)).toEqual([])
      }, 600_000)
    }
  }
})
