// The focus walk's own check (tests/support/focus-walk.ts): on a page of our own making with a
// control under a bar stuck to the page and two small controls side by side, it finds both
// faults. Every page of the app is walked in tests/browser/accessibility.test.ts.
import { describe, expect, it } from 'vitest'
import { setupBrowser } from '../support/browser'
import { walkFocus } from '../support/focus-walk'
import { pageAt } from '../support/pages'

await setupBrowser()

describe('the focus walk', () => {
  it('finds a control under a bar stuck to the page, and a small one crowded by another', async () => {
    // The check itself can fail: a page of our own making with both faults.
    const page = await pageAt(800, 600)
    await page.setContent(`<body style="margin:0">
      <div style="position:sticky;top:0;height:80px;background:#fff;z-index:5">bar</div>
      <div style="height:1000px"></div>
      <a id="under" href="#x" style="display:inline-block;width:100px;height:30px">under</a>
      <div style="height:400px"></div>
      <div><button style="width:16px;height:16px;padding:0;border:0"></button><button style="width:16px;height:16px;padding:0;border:0"></button></div>
      <div style="height:2000px"></div></body>`)
    // The link sits 20 px from the top, under the bar, where focusing it does not scroll.
    await page.evaluate(() => window.scrollTo(0, 1060))
    const problems = await walkFocus(page)
    expect(problems.some((p) => /“under” is under a bar stuck to the page \(div\)/.test(p)), problems.join('; ')).toBe(true)
    expect(problems.filter((p) => /16\.0 × 16\.0 px, with a target too close/.test(p)), problems.join('; ')).toHaveLength(2)
    await page.context().close()
  })
})
