// The route helper for requests whose work runs in the queue: wait for the work item, then
// answer as the request always has (201 with the result, or the refusal's status and words),
// or, if it is still going on at the limit (NUXT_WORK_WAIT_MS), 202 with the item and where
// to follow it.
import { createError, setResponseHeader, setResponseStatus, type H3Event } from 'h3'
import type { WorkAccepted, WorkResult } from '#shared/types/work'
import { useDb } from '../platform/db'
import { waitForWork } from '../work/items'
import type { Actor } from '../policy'

export async function answerWhenDone<T>(event: H3Event, actor: Actor, workItemId: number, answer: (done: WorkResult) => Promise<T>): Promise<T | WorkAccepted> {
  const db = useDb()
  const item = await waitForWork(db, actor, workItemId, { timeoutMs: Number(useRuntimeConfig().workWaitMs) || 60_000 })
  if (item.state === 'done' && item.result && 'revisionId' in item.result) {
    setResponseStatus(event, 201)
    return answer(item.result)
  }
  if (item.state === 'failed' && item.error) {
    throw createError({ statusCode: item.error.status, message: item.error.message, ...(item.error.data === undefined ? {} : { data: item.error.data }) })
  }
  setResponseStatus(event, 202)
  setResponseHeader(event, 'location', `/api/work/${item.id}`)
  return { workItem: item }
}
