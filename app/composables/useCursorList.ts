import type { Page } from '#shared/types/api'

/**
 * A list the server hands out a page at a time (keyset pages with a `nextCursor`): the first
 * page through useFetch, so it renders on the server and follows `query`; "Show more" appends
 * the next ones. A change of `query` starts again from the first page.
 */
export async function useCursorList<T, P extends Page<T> = Page<T>>(url: string, query: MaybeRefOrGetter<Record<string, unknown>>) {
  // Everything is set up before the first await, while the component's context is current.
  const first = useFetch<P>(url, { query })
  // useFetch's picking types cannot see through a generic page type; the answer is a whole P.
  const data = first.data as unknown as Ref<P | undefined>
  const more = shallowRef<T[]>([])
  const nextCursor = ref<string | null>(null)
  const loadingMore = ref(false)
  const moreError = shallowRef<unknown>(null)

  watch(data, (page) => {
    more.value = []
    nextCursor.value = page?.nextCursor ?? null
    moreError.value = null
  }, { immediate: true })

  const items = computed<T[]>(() => [...(data.value?.items ?? []), ...more.value])

  async function showMore(): Promise<void> {
    if (!nextCursor.value || loadingMore.value) return
    loadingMore.value = true
    moreError.value = null
    try {
      const page = await $fetch<P>(url, { query: { ...toValue(query), cursor: nextCursor.value } })
      more.value = [...more.value, ...page.items]
      nextCursor.value = page.nextCursor
    } catch (err) {
      moreError.value = err
    } finally {
      loadingMore.value = false
    }
  }

  await first
  return { data, error: first.error, status: first.status, refresh: first.refresh, items, nextCursor, loadingMore, moreError, showMore }
}
