import type { SheetWorkResult, WorkAccepted, WorkItemView } from '#shared/types/work'
import { screenSheetSvg, sheetWorkWords } from '~/utils/sheet-preview'

// The cut sheet's picture on the job and batch pages. A kept sheet comes at once; one not built
// yet is built as a work item (the server answers 202 when asked with Prefer: respond-async),
// whose progress is shown until the sheet is kept, then asked for again. The picture is the
// sheet's own SVG with a screen style added, shown as an image of a blob so nothing in the
// file runs in the page.
export function useSheetPicture(url: Ref<string>, fits: Ref<boolean>) {
  const pictureUrl = ref<string | null>(null)
  const failed = ref<string | null>(null)
  const loading = ref(true)
  const progress = ref<{ words: string; percent: number } | null>(null)
  let asked = 0

  function show(next: string | null) {
    if (pictureUrl.value) URL.revokeObjectURL(pictureUrl.value)
    pictureUrl.value = next
  }

  async function problem(answer: Response): Promise<string> {
    const body = await answer.json().catch(() => null) as { message?: string } | null
    return body?.message || `The server answered ${answer.status}.`
  }

  async function sheetText(u: string, mine: number): Promise<string> {
    // A set whose jobs changed while it was built is built again: a couple of rounds at most.
    for (let round = 0; round < 3; round++) {
      const answer = await fetch(u, { headers: { accept: 'image/svg+xml', prefer: 'respond-async' } })
      if (answer.status === 202) {
        const { workItem } = await answer.json() as WorkAccepted
        await followWork<SheetWorkResult>(workItem, (w: WorkItemView) => { if (mine === asked) progress.value = sheetWorkWords(w) })
        continue
      }
      if (!answer.ok) throw new Error(await problem(answer))
      return answer.text()
    }
    throw new Error('The sheet kept changing while it was built. Reload the page.')
  }

  async function load(u: string) {
    const mine = ++asked
    failed.value = null
    loading.value = true
    progress.value = null
    try {
      const svg = screenSheetSvg(await sheetText(u, mine))
      if (mine === asked) show(URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' })))
    } catch (err) {
      if (mine !== asked) return
      const said = (err as { data?: { message?: string } }).data?.message ?? (err as Error).message
      failed.value = said || 'The cut sheet could not be drawn.'
      loading.value = false
    } finally {
      if (mine === asked) progress.value = null
    }
  }

  watch(url, (u) => { if (fits.value) void load(u) })
  onMounted(() => { if (fits.value) void load(url.value) })
  onBeforeUnmount(() => show(null))
  return { pictureUrl, failed, loading, progress }
}
