import { describe, expect, inject, it } from 'vitest'
import { Migrator, sql } from 'kysely'
import { createDb, migrateToLatest } from '../../server/db/connect'
import { migrations } from '../../server/db/migrations'
import { historyLines } from '../../server/history/queries'
import { serviceDb } from '../support/service'
import { addArtwork, addRobot, addTypedFilm, buildProgram } from '../support/fixtures'

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

describe('migration 0008', () => {
  it('reads each typed polymer through the register; films that name nothing known, or a polymer never cut, are retired with the reason', async () => {
    const name = `register_${process.pid}_${Date.now()}`
    await sql`create database ${sql.raw(name)}`.execute(serviceDb())
    const url = new URL(inject('serviceDatabaseUrl'))
    url.pathname = `/${name}`
    const db = createDb(url.toString(), 1)
    try {
      const names = Object.keys(migrations).sort()
      const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } })
      expect((await migrator.migrateTo(names[names.indexOf('0008_films') - 1]!)).error).toBeUndefined()
      // Films as they were typed before the register, including the defect: "cast vinyl" declared chlorine-free.
      const p = await buildProgram(db, { typedFilms: true })
      const team = p.teams[0]
      const typed = async (filmName: string, polymer: string, chlorineFree: boolean) => addTypedFilm(db, p.id, filmName, polymer, chlorineFree)
      const castVinyl = await typed('Cast vinyl white', 'Cast vinyl', true)
      const mystery = await typed('Mystery offcut', 'offcut from the bin', true)
      const csm = await typed('Rubbery sheet', 'Chlorosulfonated polyethylene', true)
      const clear = await typed('Clear polyester', 'Polyester (PET) with acrylic adhesive', true)
      await sql`update film set colour = 'clear' where id = ${clear}`.execute(db)
      const art = await addArtwork(db, { teamId: team.id, authorId: team.student, status: 'approved' })
      const robot = await addRobot(db, team.id)
      const place = async (filmId: number) => (await sql<{ id: number }>`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
        values (${robot}, ${art.revisionId}, ${filmId}, 'front', 40, 1, ${p.mentor}) returning id`.execute(db)).rows[0]!.id
      const job = async (placementId: number, filmId: number, state: string) => (await sql<{ id: number }>`insert into job (placement_id, kind, quantity, film_id, created_by, state, cut_at)
        values (${placementId}, 'initial', 1, ${filmId}, ${p.mentor}, ${state}, ${state === 'queued' ? null : new Date()}) returning id`.execute(db)).rows[0]!.id
      const vinylPlacement = await place(castVinyl)
      const vinylQueued = await job(vinylPlacement, castVinyl, 'queued')
      const vinylCut = await job(vinylPlacement, castVinyl, 'cut')
      const puPlacement = await place(p.films.pu)
      const puQueued = await job(puPlacement, p.films.pu, 'queued')
      const petPlacement = await place(p.films.pet)
      const petQueued = await job(petPlacement, p.films.pet, 'queued')

      await migrateToLatest(db)
      const films = new Map((await db.selectFrom('film').select(['id', 'polymer_code', 'polymer_verdict', 'cleared', 'retired', 'retired_reason', 'opacity', 'colour_hex'])
        .where('program_id', '=', p.id).execute()).map((f) => [f.id, f]))
      expect(films.get(p.films.pet)).toMatchObject({ polymer_code: 'PET', cleared: true, retired: false, retired_reason: null })
      expect(films.get(clear)).toMatchObject({ polymer_code: 'PET', cleared: true, retired: false, opacity: 'clear' })
      // "black" is a CSS named colour (CSS Color 4): rgb(0, 0, 0).
      expect(films.get(p.films.pet)!.colour_hex).toBe('#000000')
      expect(films.get(p.films.pu)).toMatchObject({ polymer_code: 'PU', polymer_verdict: 'ask-the-lab', cleared: false, retired: false })
      expect(films.get(castVinyl)).toMatchObject({ polymer_code: 'PVC', cleared: false, retired: true })
      expect(films.get(castVinyl)!.retired_reason).toMatch(/“Cast vinyl”, which the register reads as PVC[\s\S]*hydrogen chloride/)
      expect(films.get(csm)).toMatchObject({ polymer_code: 'CSM', retired: true })
      expect(films.get(mystery)).toMatchObject({ polymer_code: 'UNKNOWN', retired: true })
      expect(films.get(mystery)!.retired_reason).toMatch(/names no polymer in the register/)

      // The waiting jobs on film that may not be cut are cancelled with the reason; the cut one is history.
      const jobs = new Map((await db.selectFrom('job').select(['id', 'state', 'cancel_reason', 'film_cleared', 'width_mm']).execute()).map((j) => [j.id, j]))
      expect(jobs.get(vinylQueued)).toMatchObject({ state: 'cancelled', film_cleared: null, width_mm: 40 })
      expect(jobs.get(vinylQueued)!.cancel_reason).toMatch(/polymer register[\s\S]*hydrogen chloride/)
      expect(jobs.get(vinylCut)).toMatchObject({ state: 'cut', film_cleared: null })
      expect(jobs.get(puQueued)!.cancel_reason).toMatch(/lab's approval/)
      expect(jobs.get(petQueued)).toMatchObject({ state: 'queued', film_cleared: true })
      // From now on nothing more is placed or cut in the cast vinyl.
      await expect(sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by) values (${vinylPlacement}, 'reprint', 1, ${castVinyl}, 40, ${p.mentor})`.execute(db)).rejects.toThrow(/job_film_cleared/)
      await expect(sql`update job set state = 'queued', cut_at = null where id = ${vinylCut}`.execute(db)).rejects.toThrow(/job_waiting_needs_cleared_film/)
      // What was typed stays in the history.
      const lines = await db.selectFrom('audit_event').select('detail').where('action', '=', 'register-film').where('subject_id', '=', String(castVinyl)).execute()
      expect(lines.map((l) => l.detail)).toEqual([expect.objectContaining({ typed: 'Cast vinyl', polymer: 'PVC', retired: true })])

      // And back down to the typed polymers, once nothing is on film that may not be cut.
      expect((await migrator.migrateTo(names[names.indexOf('0008_films') - 1]!)).error).toMatchObject({ message: /Remove them first/ })
      await sql`delete from job where film_cleared is null`.execute(db)
      await sql`delete from placement where film_cleared is null`.execute(db)
      expect((await migrator.migrateTo(names[names.indexOf('0008_films') - 1]!)).error).toBeUndefined()
      const back = await sql<{ base_polymer: string; chlorine_free: boolean }>`select base_polymer, chlorine_free from film where id = ${castVinyl}`.execute(db)
      expect(back.rows[0]).toEqual({ base_polymer: 'PVC (polyvinyl chloride)', chlorine_free: false })
    } finally {
      await db.destroy()
      await sql`drop database if exists ${sql.raw(name)}`.execute(serviceDb())
    }
  })
})
