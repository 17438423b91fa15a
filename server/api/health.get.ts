import { sql } from 'kysely'
import { useDb } from '#server/platform/db'
import { checkBucket } from '#server/platform/object-store'

// Answers only when the database and the object store both answer.
export default defineEventHandler(async () => {
  await Promise.all([sql`select 1`.execute(useDb()), checkBucket()])
  return { ok: true }
})
