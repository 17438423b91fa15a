// The app's pages, as the accessibility checks walk them: every page the navigation offers a
// role, and one of each page reached through an id, made the way people make them.
import { expect, inject, it } from 'vitest'
import { getBrowser } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { signedIn } from './client'
import { signInThroughForm } from './browser'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo'
import { drawing } from './images'
import { approvedOnRobot, teamId } from './scenario'
import { photograph, threeInkDrawing } from '../unit/pipeline/colour/drawing'
import { uploadArtwork } from './upload'

export const ROLES = ['mentor', 'designer', 'student', 'operator'] as const
export const WIDTHS = [{ name: 'desktop', width: 1440, height: 900 }, { name: 'phone', width: 390, height: 844 }] as const
const PUBLIC_PATHS = ['/sign-in', '/reset'] as const

/**
 * An artwork in review, an approved one on a robot with a queued job, a layered one (three inks)
 * on the same robot with its layer jobs; the pages behind their ids.
 */
async function arrangeDetailPaths(title: string): Promise<string[]> {
  const { mentor, student: author, artworkId, robotId, revisionId, film, wrens } = await approvedOnRobot(title)
  const placed = await mentor.post('/api/placements', { robotId, revisionId, filmId: film.id, spot: 'front bumper', widthMm: 40, quantity: 1, spares: 1 })
  expect(placed.status, JSON.stringify(placed.body)).toBe(201)
  const inks = await uploadArtwork(author, { file: (await photograph(threeInkDrawing())).jpeg, fileName: 'three-inks.jpg', title: `${title} in three inks ${Date.now()}`, teamId: wrens, widthMm: 120 })
  expect(inks.status, JSON.stringify(inks.body)).toBe(201)
  expect(inks.body.revision.layerCount).toBe(3)
  expect((await author.post(`/api/revisions/${inks.body.revision.id}/submit`)).status).toBe(200)
  expect((await mentor.post(`/api/revisions/${inks.body.revision.id}/review`, { decision: 'approve' })).status).toBe(200)
  const layered = await mentor.post('/api/placements', { robotId, revisionId: inks.body.revision.id, layerFilmIds: [film.id, film.id, film.id], spot: 'side panel', widthMm: 120, quantity: 1 })
  expect(layered.status, JSON.stringify(layered.body)).toBe(201)
  const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const waiting = await uploadArtwork(student, { file: await drawing('png', 500, 300), title: `Waiting for a look ${Date.now()}`, teamId: await teamId(), widthMm: 70 })
  expect(waiting.status).toBe(201)
  expect((await student.post(`/api/revisions/${waiting.body.revision.id}/submit`)).status).toBe(200)
  const mail = (await mentor.get('/api/mail')).body as { id: number }[]
  return [
    `/artworks/${artworkId}`, `/artworks/${artworkId}/bench`, `/artworks/${artworkId}/compare`,
    `/artworks/${waiting.body.artwork.id}`, '/artworks/new',
    `/artworks/${inks.body.artwork.id}`, `/lab/jobs/${layered.body.jobs[1].id}`,
    `/robots/${robotId}`, `/films/${film.id}`, `/teams/${await teamId()}`, `/lab/jobs/${placed.body.jobs[0].id}`,
    ...(mail[0] ? [`/mail/${mail[0].id}`] : []),
  ]
}

/** Every page the signed-in page's navigation offers (menus included, open or not), then the pages behind an id. */
async function pagesOf(page: Page, detailPaths: string[]): Promise<string[]> {
  await page.locator('[data-test="sign-out"]').waitFor()
  const navPaths = await page.locator('header nav a[href^="/"]').evaluateAll((links) => links.map((a) => a.getAttribute('href')!))
  expect(navPaths.length).toBeGreaterThan(2)
  return [...new Set([...navPaths, ...detailPaths])]
}

/** A page in a browser context of its own (axe-core's Playwright integration asks for one). */
export async function pageAt(width: number, height: number): Promise<Page> {
  const context = await (await getBrowser()).newContext({ viewport: { width, height } })
  return context.newPage()
}

const slug = (p: string) => p.replace(/^\//, '').replace(/[^\w-]+/g, '-') || 'start'

/**
 * The tests of one check on every page: the public pages at each width, then every page each
 * role reaches at each width. `check` opens nothing itself: the page is loaded at `path`
 * (`shot` names a screenshot of it) and it answers what it found wrong; a test fails with
 * every page that has findings.
 */
export function checkEveryPage(title: string, check: (page: Page, shot: string) => Promise<unknown[]>): void {
  let detailPaths: string[] = []
  it('arranges an artwork in review, an approved one on a robot with a queued job', async () => {
    detailPaths = await arrangeDetailPaths(title)
  })
  const visit = async (page: Page, path: string, shot: string) => {
    await page.goto(new URL(path, inject('baseUrl')).toString(), { waitUntil: 'networkidle' })
    return { path, landedOn: new URL(page.url()).pathname, findings: await check(page, shot) }
  }
  for (const size of WIDTHS) {
    it(`the public pages at ${size.width} px`, async () => {
      const page = await pageAt(size.width, size.height)
      const results = []
      for (const path of PUBLIC_PATHS) results.push(await visit(page, path, `public-${slug(path)}-${size.width}`))
      await page.context().close()
      expect(results.filter((r) => r.findings.length)).toEqual([])
    }, 120_000)

    for (const role of ROLES) {
      it(`every page ${/^[aeiou]/.test(role) ? 'an' : 'a'} ${role} reaches at ${size.width} px`, async () => {
        const page = await pageAt(size.width, size.height)
        await signInThroughForm(page, DEMO_ACCOUNTS[role].email, DEMO_PASSWORD)
        await page.waitForURL((u) => u.pathname !== '/sign-in')
        const results = []
        for (const path of await pagesOf(page, detailPaths)) results.push(await visit(page, path, `${role}-${slug(path)}-${size.width}`))
        await page.context().close()
        expect(results.filter((r) => r.findings.length)).toEqual([])
      }, 600_000)
    }
  }
}
