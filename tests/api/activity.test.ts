// The program's activity filtered by person, kind, team and days, and paged past the latest 200.
import { describe, expect, it } from 'vitest'
import { allPages, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { makeUser } from '../support/people'
import { teamId } from '../support/scenario'
import { uploadArtwork } from '../support/upload'

interface Line { id: number; action: string; actor: { id: number; name: string } | null; at: string }

const day = (offsetDays: number) => new Date(Date.now() + offsetDays * 86_400_000).toISOString().slice(0, 10)

describe('the activity', () => {
  it('filters by person, kind, team and days', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const sprocket = await makeUser('Filter Sprocket', { team: 'Tidewater Sprockets', role: 'designer' })
    const client = await signedIn(sprocket.email, sprocket.password)
    const up = await uploadArtwork(client, { file: await drawing('png', 400, 300), title: `Filtered gull ${Date.now()}`, teamId: await teamId('Tidewater Sprockets'), widthMm: 50 })
    expect(up.status).toBe(201)

    const mine = await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}`)
    expect(mine.map((l) => l.action).sort()).toEqual(['sign-in', 'upload'])
    expect(mine.every((l) => l.actor?.id === sprocket.id)).toBe(true)

    const artworkLines = await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&kind=artworks`)
    expect(artworkLines.map((l) => l.action)).toEqual(['upload'])
    expect(await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&kind=accounts`)).toHaveLength(1)

    // The upload is the Sprockets' line, not the Wrens'.
    expect((await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&teamId=${await teamId('Tidewater Sprockets')}`)).map((l) => l.action)).toEqual(['upload'])
    expect(await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&teamId=${await teamId('Copper Wrens')}`)).toEqual([])

    // Days, both ends included.
    expect(await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&from=${day(0)}&to=${day(0)}`)).toHaveLength(2)
    expect(await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&from=${day(1)}`)).toEqual([])
    expect(await allPages<Line>(mentor, `/api/audit?actorId=${sprocket.id}&to=${day(-1)}`)).toEqual([])
    expect((await mentor.get('/api/audit?from=yesterday')).status).toBe(400)
    expect((await mentor.get('/api/audit?kind=everything')).status).toBe(400)
  })

  it('pages back through more than 200 lines, none twice', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const busy = await makeUser('Busy Signer')
    const program = await testDb().selectFrom('program').select('id').where('name', '=', 'Harbourline Robotics').executeTakeFirstOrThrow()
    await testDb().insertInto('audit_event')
      .values(Array.from({ length: 250 }, () => ({ program_id: program.id, actor_id: busy.id, action: 'sign-in' as const, subject_type: 'user' as const, subject_id: String(busy.id), detail: '{}' })))
      .execute()
    const first = await mentor.get(`/api/audit?actorId=${busy.id}&limit=100`)
    expect(first.body.items).toHaveLength(100)
    const all = await allPages<Line>(mentor, `/api/audit?actorId=${busy.id}&limit=100`)
    expect(all).toHaveLength(250)
    expect(new Set(all.map((l) => l.id)).size).toBe(250)
    expect(all.map((l) => l.id)).toEqual([...all.map((l) => l.id)].sort((a, b) => b - a))
  })
})
