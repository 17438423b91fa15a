// The focus walk of every page (run by tests/browser/accessibility.test.ts in the same visit
// as axe-core, and tried on a page with known faults in focus-and-targets.test.ts): each
// control that takes focus is a target of at least 24 × 24 CSS px, or an inline link in a
// sentence, or spaced so a 24 px circle on it touches no other target (WCAG 2.2, success
// criterion 2.5.8 and its exceptions); and once focused, the middle of what shows of it is not
// under a bar stuck to the page (2.4.11), read with elementFromPoint.
import type { Page } from 'playwright-core'

/** Every focusable control of the page in turn: focused, then measured where focus put it. */
export function walkFocus(page: Page): Promise<string[]> {
  return page.evaluate(async () => {
    const MIN = 24
    const SLACK = 0.5 // sub-pixel layout
    const selector = 'a[href], button, input:not([type="hidden"]), select, textarea, summary, [tabindex]:not([tabindex="-1"])'
    const shown = (el: HTMLElement) => !(el as HTMLButtonElement).disabled && !el.closest('[inert]') && el.getClientRects().length > 0
      && getComputedStyle(el).visibility !== 'hidden'
    const targets = [...document.querySelectorAll<HTMLElement>(selector)].filter(shown)
    const label = (el: HTMLElement) => `${el.tagName.toLowerCase()}${el.dataset.test ? `[${el.dataset.test}]` : ''} “${(el.getAttribute('aria-label') ?? el.textContent ?? el.getAttribute('name') ?? '').trim().replace(/\s+/g, ' ').slice(0, 40)}”`
    const centre = (r: DOMRect) => ({ x: r.left + r.width / 2, y: r.top + r.height / 2 })
    const distanceTo = (p: { x: number; y: number }, r: DOMRect) => Math.hypot(Math.max(r.left - p.x, 0, p.x - r.right), Math.max(r.top - p.y, 0, p.y - r.bottom))
    const small = (r: DOMRect) => r.width < MIN - SLACK || r.height < MIN - SLACK
    /** An inline link in a sentence: its size is set by the line of text around it. */
    const inline = (el: HTMLElement) => el.tagName === 'A' && getComputedStyle(el).display === 'inline'
      && (el.parentElement?.textContent ?? '').trim().length > (el.textContent ?? '').trim().length
    /** The spacing exception: a 24 px circle on the target's centre meets no other target, nor another small target's circle. */
    const spaced = (el: HTMLElement, r: DOMRect) => {
      const c = centre(r)
      return targets.every((o) => {
        if (o === el || o.contains(el) || el.contains(o) || !shown(o)) return true
        const or = o.getBoundingClientRect()
        if (or.width === 0 || or.height === 0) return true
        if (distanceTo(c, or) < MIN / 2) return false
        return !small(or) || Math.hypot(centre(or).x - c.x, centre(or).y - c.y) >= MIN
      })
    }
    const stuck = (el: Element | null) => {
      for (let e = el; e; e = e.parentElement) {
        const p = getComputedStyle(e).position
        if (p === 'sticky' || p === 'fixed') return e
      }
      return null
    }
    const frame = () => new Promise((resolve) => requestAnimationFrame(() => resolve(null)))
    const problems: string[] = []
    let walked = 0
    for (const el of targets) {
      el.focus()
      if (document.activeElement !== el) continue
      walked++
      await frame()
      const r = el.getBoundingClientRect()
      // A visually hidden control (shown through its label) is measured by its label.
      const box = r.width <= 2 && r.height <= 2 ? (el.closest('label')?.getBoundingClientRect() ?? r) : r
      if (small(box) && !inline(el) && !spaced(el, box)) problems.push(`${label(el)} is ${box.width.toFixed(1)} × ${box.height.toFixed(1)} px, with a target too close`)
      const x0 = Math.max(box.left, 0), x1 = Math.min(box.right, innerWidth), y0 = Math.max(box.top, 0), y1 = Math.min(box.bottom, innerHeight)
      if (x1 <= x0 || y1 <= y0) continue
      const hit = document.elementFromPoint((x0 + x1) / 2, (y0 + y1) / 2)
      if (!hit || el.contains(hit) || hit.contains(el)) continue
      const bar = stuck(hit)
      if (bar && !bar.contains(el)) problems.push(`${label(el)} is under a bar stuck to the page (${bar.tagName.toLowerCase()}${bar.id ? `#${bar.id}` : ''})`)
    }
    (document.activeElement as HTMLElement | null)?.blur()
    // Every page has at least the shell's links or the sign-in form: a walk that focused nothing checked nothing.
    if (walked === 0) problems.push('no control took focus')
    return problems
  })
}
