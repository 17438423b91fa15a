/**
 * Keeps keyboard focus clear of a bar stuck to the top of the page (WCAG 2.2, 2.4.11): the
 * page's scroll padding follows the bar's height, which changes as it wraps on a narrow screen.
 * The bar may appear only once the page has loaded, so its element is watched.
 */
export function useStickyClearance(bar: Ref<HTMLElement | null>, gapPx = 12) {
  let observer: ResizeObserver | undefined
  const pad = (px: string) => { document.documentElement.style.scrollPaddingTop = px }
  watch(bar, (el) => {
    observer?.disconnect()
    if (!el) return pad('')
    const set = () => pad(`${Math.ceil(el.getBoundingClientRect().height) + gapPx}px`)
    set()
    observer = new ResizeObserver(set)
    observer.observe(el)
  }, { flush: 'post' })
  onBeforeUnmount(() => {
    observer?.disconnect()
    pad('')
  })
}
