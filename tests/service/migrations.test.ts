import { describe, expect, inject, it } from 'vitest'
import { Migrator, sql } from 'kysely'
import { createDb, migrateToLatest } from '../../server/db/connect'
import { migrations } from '../../server/db/migrations'
import { historyLines } from '../../server/history/queries'
import { serviceDb } from '../support/service'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'

describe('migration 0005', () => {
  it('moves what each history line is about from its JSON detail into indexed columns', async () => {
    const name = `backfill_${process.pid}_${Date.now()}`
    await sql`create database ${sql.raw(name)}`.execute(serviceDb())
    const url = new URL(inject('serviceDatabaseUrl'))
    url.pathname = `/${name}`
    const db = createDb(url.toString(), 1)
    try {
      const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } })
      const before = await migrator.migrateTo('0004_laser_work_area')
      expect(before.error).toBeUndefined()
      // History as the code before 0005 wrote it: ids of artworks and placements in the detail.
      const p = await buildProgram(db, { typedFilms: true })
      const team = p.teams[0]
      const art = await addArtwork(db, { teamId: team.id, authorId: team.student, status: 'approved' })
      const robotId = await addRobot(db, team.id)
      const placement = (await sql<{ id: number }>`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
        values (${robotId}, ${art.revisionId}, ${p.films.pet}, 'front', 40, 1, ${p.mentor}) returning id`.execute(db)).rows[0]!
      const job = (await sql<{ id: number }>`insert into job (placement_id, kind, quantity, film_id, created_by)
        values (${placement.id}, 'initial', 1, ${p.films.pet}, ${p.mentor}) returning id`.execute(db)).rows[0]!
      const line = (action: string, subjectType: string, subjectId: number, detail: object) => sql`
        insert into audit_event (program_id, actor_id, action, subject_type, subject_id, detail)
        values (${p.id}, ${p.mentor}, ${action}, ${subjectType}, ${String(subjectId)}, ${JSON.stringify(detail)}::jsonb)`.execute(db)
      await line('upload', 'artwork', art.id, { title: 'x', revision: 1 })
      await line('add-robot', 'robot', robotId, { name: 'x' })
      await line('place', 'robot', robotId, { artworkId: art.id, placementId: placement.id })
      await line('queue-job', 'job', job.id, { placementId: placement.id })
      await line('mark-cut', 'job', job.id, { placementId: placement.id })
      await line('create-team', 'team', team.id, { name: 'x' })

      await migrateToLatest(db)
      const rows = await db.selectFrom('audit_event').select(['action', 'artwork_id', 'robot_id', 'job_id']).where('program_id', '=', p.id).where('action', '<>', 'register-film').orderBy('id').execute()
      expect(rows).toEqual([
        { action: 'upload', artwork_id: art.id, robot_id: null, job_id: null },
        { action: 'add-robot', artwork_id: null, robot_id: robotId, job_id: null },
        { action: 'place', artwork_id: art.id, robot_id: robotId, job_id: null },
        { action: 'queue-job', artwork_id: null, robot_id: robotId, job_id: job.id },
        { action: 'mark-cut', artwork_id: null, robot_id: robotId, job_id: job.id },
        { action: 'create-team', artwork_id: null, robot_id: null, job_id: null },
      ])
      expect((await historyLines(db, p.id, { robotId })).map((h) => h.action)).toEqual(['add-robot', 'place', 'queue-job', 'mark-cut'])
      expect((await historyLines(db, p.id, { artworkId: art.id })).map((h) => h.action)).toEqual(['upload', 'place'])
      // The history is read by index, not by scanning every line's JSON.
      await sql`analyze audit_event`.execute(db)
      await sql`set enable_seqscan = off`.execute(db)
      const plan = await sql<{ 'QUERY PLAN': string }>`explain select id from audit_event where robot_id = ${robotId} order by id`.execute(db)
      expect(plan.rows.map((r) => r['QUERY PLAN']).join('\n')).toMatch(/audit_event_robot_id/)
    } finally {
      await db.destroy()
      await sql`drop database if exists ${sql.raw(name)}`.execute(serviceDb())
    }
  })
})
