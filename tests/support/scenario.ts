// Arranged cases that several test files need, made through the API as people would.
import { type ApiClient, signedIn } from './client'
import { testDb } from './db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo'
import { drawing } from './images'
import { makeUser } from './people'
import { uploadArtwork } from './upload'

export async function teamId(name = 'Copper Wrens'): Promise<number> {
  return (await testDb().selectFrom('team').select('id').where('name', '=', name).executeTakeFirstOrThrow()).id
}

/** A usable (chlorine-free, not retired) film of the demo program, as the API lists it. */
export async function usableFilm(c: ApiClient): Promise<{ id: number; name: string }> {
  const films = (await c.get('/api/films')).body as { id: number; name: string; usable: boolean }[]
  const film = films.find((f) => f.usable)
  if (!film) throw new Error('the demo program has no usable film')
  return film
}

/** An approved revision of a fresh artwork of the Copper Wrens, and a robot to put it on. */
export async function approvedOnRobot(tag: string) {
  const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
  const wrens = await teamId()
  const up = await uploadArtwork(student, { file: await drawing('png', 600, 400), title: `${tag} ${Date.now()}`, teamId: wrens, widthMm: 60 })
  if (up.status !== 201) throw new Error(`upload answered ${up.status}: ${JSON.stringify(up.body)}`)
  await student.post(`/api/revisions/${up.body.revision.id}/submit`)
  const approved = await mentor.post(`/api/revisions/${up.body.revision.id}/review`, { decision: 'approve' })
  if (approved.status !== 200) throw new Error(`approve answered ${approved.status}: ${JSON.stringify(approved.body)}`)
  const robot = await mentor.post('/api/robots', { teamId: wrens, name: `${tag} robot ${Date.now()}`, season: '2026–27' })
  const film = await usableFilm(mentor)
  return { student, mentor, wrens, revisionId: up.body.revision.id as number, artworkId: up.body.artwork.id as number, robotId: robot.body.id as number, film }
}

/** A second program with its own mentor, as another school on the same installation. */
export async function otherProgramMentor(tag: string) {
  const db = testDb()
  const program = await db.insertInto('program').values({ name: `${tag} program ${Date.now()}`, school: 'Another fictional school' }).returning('id').executeTakeFirstOrThrow()
  const u = await makeUser(`${tag} Mentor`)
  await db.updateTable('users').set({ program_id: program.id }).where('id', '=', u.id).execute()
  await db.insertInto('mentorship').values({ user_id: u.id, program_id: program.id }).execute()
  return { ...u, programId: program.id, client: await signedIn(u.email, u.password) }
}
