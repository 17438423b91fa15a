// Work whose runner was killed on the job's last try: graphile-worker never takes a job with no
// tries left, so without a sweep the item would show "running" for ever.
import { describe, expect } from 'vitest'
import { sql } from 'kysely'
import { test } from '../support/service'
import { buildProgram } from '../support/fixtures'
import { addJob } from '../../server/platform/work-queue'
import { giveUpStrandedWork, MAKE_REVISION, STRANDED } from '../../server/work/items'

describe('stranded work', () => {
  test('is given up once its job has no tries left and no runner holds it; work that can still run is left alone', async ({ trx }) => {
    const p = await buildProgram(trx)
    const item = async (job: { attempts: number; locked: boolean } | null) => {
      const { id } = await trx.insertInto('work_item').values({ program_id: p.id, kind: 'upload', asked_by: p.teams[0].student, input: '{}', state: 'running' })
        .returning('id').executeTakeFirstOrThrow()
      if (job) {
        await addJob(trx, MAKE_REVISION, { workItemId: id }, { key: `work-item-${id}`, maxAttempts: 3 })
        await sql`update graphile_worker._private_jobs set attempts = ${job.attempts},
          locked_at = ${job.locked ? sql`now()` : null}, locked_by = ${job.locked ? 'a-runner' : null}
          where key = ${`work-item-${id}`}`.execute(trx)
      }
      return id
    }
    const lastTryAbandoned = await item({ attempts: 3, locked: false })
    const noJob = await item(null)
    const lastTryRunning = await item({ attempts: 3, locked: true })
    const willRetry = await item({ attempts: 1, locked: false })

    expect((await giveUpStrandedWork(trx)).sort()).toEqual([lastTryAbandoned, noJob].sort())
    const rows = await trx.selectFrom('work_item').select(['id', 'state', 'error', 'finished_at'])
      .where('id', 'in', [lastTryAbandoned, noJob, lastTryRunning, willRetry]).orderBy('id').execute()
    expect(rows.map((r) => [r.id, r.state])).toEqual([[lastTryAbandoned, 'failed'], [noJob, 'failed'], [lastTryRunning, 'running'], [willRetry, 'running']])
    expect(rows[0]!.error).toEqual(STRANDED)
    expect(rows[0]!.finished_at).not.toBeNull()
  })
})
