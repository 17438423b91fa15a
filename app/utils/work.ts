import type { WorkItemView, WorkResult } from '#shared/types/work'

/**
 * Follows background work the server answered 202 for, reading GET /api/work/[id] until it
 * is finished. Resolves with its result; rejects like $fetch with the refusal it ended in, so
 * apiProblem() reads it as it reads any other answer.
 */
export async function followWork<R extends NonNullable<WorkItemView['result']> = WorkResult>(first: WorkItemView, onItem: (item: WorkItemView) => void, intervalMs = 700): Promise<R> {
  let item = first
  for (;;) {
    onItem(item)
    // The caller knows what its kind of work leaves.
    if (item.state === 'done' && item.result) return item.result as R
    if (item.state === 'failed' && item.error) {
      const { status, message, data } = item.error
      throw { statusCode: status, data: { statusCode: status, message, data } }
    }
    await new Promise((r) => setTimeout(r, intervalMs))
    item = await $fetch<WorkItemView>(`/api/work/${item.id}`)
  }
}
