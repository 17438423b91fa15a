import { useDb } from '#server/platform/db'
import { programWaiting } from '#server/people/waiting'

// What waits for the mentor: reviews, the queue and what blocks it, low films, bare robots.
export default defineEventHandler(async (event) => programWaiting(useDb(), await requireCan(event, 'program.manage')))
