// Every API route, asked by everyone (signed out, student, designer, operator, mentor) about
// things of their own team, of another team and of another program, answers with the status
// the policy (server/policy) decides: 401 signed out, 403 for a role that may not act, 404
// for things outside the actor's scope, and otherwise gets past the guards. Allowed requests
// carry an invalid body wherever the route validates after its guards, so they change nothing.
import { readdirSync, statSync } from 'node:fs'
import path from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { can, canFollowWork, type Actor, type TeamSubject, type WorkSubject } from '../../server/policy'
import { loadActor } from '../../server/auth/service'
import { newToken } from '../../server/platform/tokens'
import type { ProgramAction, TeamAction } from '../../shared/types/policy'
import { ApiClient, signedIn, type Reply } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'
import { drawing } from '../support/images'
import { makeUser } from '../support/people'
import { uploadArtwork } from '../support/upload'
import { copyProfile, presetProfile } from '../../shared/plates/profiles'

const WHO = ['signed out', 'student', 'designer', 'operator', 'mentor'] as const
const WHERE = ['own team', 'other team', 'other program'] as const
type Who = (typeof WHO)[number]
type Where = (typeof WHERE)[number]
/** Got past every guard: anything but 401, 403 and 404 (and no server fault). */
const PASS = 'past the guards'
type Expected = number | typeof PASS

interface Ask { path: string; body?: unknown; upload?: { teamId: number } }
interface RouteRule {
  ask: (where: Where) => Ask
  /** Public: this status for everyone, signed in or not. */
  fixed?: number | typeof PASS
  /** Program work, checked before anything is looked up (403). */
  guard?: ProgramAction
  /** Whose thing it is: a team's (the SQL scope, 404) or the program's (404 for another program's). */
  scope?: TeamAction | 'program'
  /** Then the role in the thing's team (403). */
  action?: TeamAction
  /** Asks for something that exists for nobody (404 once past the guards). */
  missing?: true
  /** Background work: found only by the person who asked for it and the program's mentors (404). */
  work?: true
}

// ---------- the things asked about ----------

interface Things {
  team: Record<Where, number>
  subject: Record<Where, TeamSubject>
  artwork: Record<Where, number>
  revision: Record<Where, number>
  robot: Record<Where, number>
  placement: Record<Where, number>
  job: Record<Where, number>
  film: Record<Where, number>
  person: Record<Where, number>
  invitation: Record<Where, number>
  batch: Record<Where, number>
  ruleProfile: Record<Where, number>
  work: Record<Where, number>
  workSubject: Record<Where, WorkSubject>
  draftRevision: number
}
let things: Things
const clients = {} as Record<Who, ApiClient>
const actors = {} as Record<Exclude<Who, 'signed out'>, Actor>

async function invitation(programId: number, teamId: number, invitedBy: number | null) {
  const email = `matrix.${Date.now()}.${Math.random().toString(36).slice(2)}@tests.example`
  return (await testDb().insertInto('invitation').values({
    program_id: programId, email, name: 'Matrix Invitee', role: 'student', team_id: teamId,
    token_hash: newToken().hash, invited_by: invitedBy, expires_at: new Date(Date.now() + 3_600_000),
  }).returning('id').executeTakeFirstOrThrow()).id
}

async function placed(revisionId: number, robotId: number, filmId: number, by: number) {
  const db = testDb()
  const p = await db.insertInto('placement').values({ robot_id: robotId, revision_id: revisionId, film_id: filmId, spot: 'matrix', width_mm: 40, quantity: 1, created_by: by })
    .returning('id').executeTakeFirstOrThrow()
  const job = await db.insertInto('job').values({ placement_id: p.id, kind: 'initial', quantity: 1, film_id: filmId, width_mm: 40, created_by: by }).returning('id').executeTakeFirstOrThrow()
  return { placement: p.id, job: job.id }
}

beforeAll(async () => {
  const db = testDb()
  const demo = await db.selectFrom('program').select('id').where('name', '=', 'Harbourline Robotics').executeTakeFirstOrThrow()
  const teamId = async (name: string) => (await db.selectFrom('team').select('id').where('name', '=', name).where('program_id', '=', demo.id).executeTakeFirstOrThrow()).id
  const userId = async (email: string) => (await db.selectFrom('users').select('id').where('email', '=', email).executeTakeFirstOrThrow()).id
  const wrens = await teamId('Copper Wrens')
  const sprockets = await teamId('Tidewater Sprockets')
  const far = await buildProgram(db)
  const farTeam = far.teams[0]

  for (const who of WHO) {
    clients[who] = who === 'signed out' ? new ApiClient() : await signedIn(DEMO_ACCOUNTS[who].email, DEMO_PASSWORD)
    if (who !== 'signed out') actors[who] = (await loadActor(db, await userId(DEMO_ACCOUNTS[who].email), null))!
  }
  // Real uploads where the files must exist; rows made by hand where nothing is read.
  const ownUpload = await uploadArtwork(clients.student, { file: await drawing('png', 240, 160), title: `Matrix own ${Date.now()}`, teamId: wrens, widthMm: 40 })
  const otherUpload = await uploadArtwork(await signedIn('juniper@harbourline.example', DEMO_PASSWORD), { file: await drawing('png', 250, 160), title: `Matrix other ${Date.now()}`, teamId: sprockets, widthMm: 40 })
  expect([ownUpload.status, otherUpload.status]).toEqual([201, 201])
  const farArtwork = await addArtwork(db, { teamId: farTeam.id, authorId: farTeam.student })
  const pet = (await db.selectFrom('film').select('id').where('program_id', '=', demo.id).where('polymer_code', '=', 'PET').where('retired', '=', false).orderBy('id').executeTakeFirstOrThrow()).id
  const mentorId = await userId(DEMO_ACCOUNTS.mentor.email)
  const approved = {
    'own team': await addArtwork(db, { teamId: wrens, authorId: mentorId, status: 'approved' }),
    'other team': await addArtwork(db, { teamId: sprockets, authorId: mentorId, status: 'approved' }),
    'other program': await addArtwork(db, { teamId: farTeam.id, authorId: far.mentor, status: 'approved' }),
  }
  const robot = {
    'own team': await addRobot(db, wrens), 'other team': await addRobot(db, sprockets), 'other program': await addRobot(db, farTeam.id),
  }
  const own = await placed(approved['own team'].revisionId, robot['own team'], pet, mentorId)
  const other = await placed(approved['other team'].revisionId, robot['other team'], pet, mentorId)
  const away = await placed(approved['other program'].revisionId, robot['other program'], far.films.pet, far.mentor)
  const loner = await makeUser('Matrix Loner')
  const batch = async (programId: number, filmId: number, by: number) =>
    (await db.insertInto('batch').values({ program_id: programId, film_id: filmId, created_by: by }).returning('id').executeTakeFirstOrThrow()).id
  const ownBatch = await batch(demo.id, pet, mentorId)
  const rules = async (programId: number, by: number) => (await db.insertInto('rule_profile').values({
    program_id: programId, name: 'Matrix rules', profile: JSON.stringify(copyProfile(presetProfile('frc-2023')!, `matrix-${programId}`)), created_by: by,
  }).returning('id').executeTakeFirstOrThrow()).id
  const ownRules = await rules(demo.id, mentorId)
  const workOf = async (revisionId: number) => db.selectFrom('work_item').select(['id', 'program_id', 'asked_by'])
    .where(sql<number>`(result->>'revisionId')::int`, '=', revisionId).executeTakeFirstOrThrow()
  // The other program's work waits forever: it has no job.
  const farWork = await db.insertInto('work_item').values({ program_id: far.id, kind: 'revise', asked_by: far.mentor, input: '{}' })
    .returning(['id', 'program_id', 'asked_by']).executeTakeFirstOrThrow()
  const work = { 'own team': await workOf(ownUpload.body.revision.id), 'other team': await workOf(otherUpload.body.revision.id), 'other program': farWork }
  things = {
    team: { 'own team': wrens, 'other team': sprockets, 'other program': farTeam.id },
    subject: {
      'own team': { teamId: wrens, programId: demo.id },
      'other team': { teamId: sprockets, programId: demo.id },
      'other program': { teamId: farTeam.id, programId: far.id },
    },
    artwork: { 'own team': ownUpload.body.artwork.id, 'other team': otherUpload.body.artwork.id, 'other program': farArtwork.id },
    revision: { 'own team': ownUpload.body.revision.id, 'other team': otherUpload.body.revision.id, 'other program': farArtwork.revisionId },
    robot,
    placement: { 'own team': own.placement, 'other team': other.placement, 'other program': away.placement },
    job: { 'own team': own.job, 'other team': other.job, 'other program': away.job },
    film: { 'own team': pet, 'other team': pet, 'other program': far.films.pet },
    person: { 'own team': loner.id, 'other team': loner.id, 'other program': far.mentor },
    invitation: {
      'own team': await invitation(demo.id, wrens, mentorId),
      'other team': await invitation(demo.id, sprockets, mentorId),
      'other program': await invitation(far.id, farTeam.id, far.mentor),
    },
    batch: { 'own team': ownBatch, 'other team': ownBatch, 'other program': await batch(far.id, far.films.pet, far.mentor) },
    ruleProfile: { 'own team': ownRules, 'other team': ownRules, 'other program': await rules(far.id, far.mentor) },
    work: { 'own team': work['own team'].id, 'other team': work['other team'].id, 'other program': work['other program'].id },
    workSubject: Object.fromEntries(WHERE.map((w) => [w, { programId: work[w].program_id, askedBy: work[w].asked_by }])) as Record<Where, WorkSubject>,
    draftRevision: ownUpload.body.revision.id,
  }
})

// ---------- every route and its rule ----------

const t = () => things
const unique = () => `Matrix ${Date.now()} ${Math.random().toString(36).slice(2, 7)}`

const ROUTES: Record<string, RouteRule> = {
  'GET /api/health': { fixed: PASS, ask: () => ({ path: '/api/health' }) },
  'GET /api/[...]': { fixed: 404, ask: () => ({ path: '/api/no-such-route' }) },
  'POST /api/auth/sign-in': { fixed: 400, ask: () => ({ path: '/api/auth/sign-in', body: {} }) },
  'GET /api/invitations/by-token/[token]': { fixed: 404, ask: () => ({ path: '/api/invitations/by-token/no-such-token' }) },
  'POST /api/invitations/by-token/[token]/accept': { fixed: 400, ask: () => ({ path: '/api/invitations/by-token/no-such-token/accept', body: {} }) },
  'GET /api/password-resets/[token]': { fixed: 404, ask: () => ({ path: '/api/password-resets/no-such-token' }) },
  'POST /api/password-resets/[token]': { fixed: 400, ask: () => ({ path: '/api/password-resets/no-such-token', body: {} }) },
  'POST /api/password-resets': { fixed: 400, ask: () => ({ path: '/api/password-resets', body: {} }) },

  'GET /api/me': { ask: () => ({ path: '/api/me' }) },
  'GET /api/teams': { ask: () => ({ path: '/api/teams' }) },
  'GET /api/films': { ask: () => ({ path: '/api/films' }) },
  'GET /api/polymers': { ask: () => ({ path: '/api/polymers?q=vinyl' }) },
  'GET /api/artworks': { ask: () => ({ path: '/api/artworks' }) },
  'GET /api/robots': { ask: () => ({ path: '/api/robots' }) },

  'POST /api/teams': { guard: 'team.manage', ask: () => ({ path: '/api/teams', body: { name: '' } }) },
  'GET /api/teams/[id]': { scope: 'team.view', action: 'team.members', ask: (w) => ({ path: `/api/teams/${t().team[w]}` }) },
  'PATCH /api/teams/[id]': { guard: 'team.manage', scope: 'program', ask: (w) => ({ path: `/api/teams/${t().team[w]}`, body: {} }) },
  'POST /api/films': { guard: 'film.manage', ask: () => ({ path: '/api/films', body: {} }) },
  'PATCH /api/films/[id]': { guard: 'film.manage', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}`, body: {} }) },
  'GET /api/films/[id]': { scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}` }) },
  // Polyester needs no approval (422), and has none to withdraw (409): nothing changes.
  'POST /api/films/[id]/lab-approval': { guard: 'film.manage', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/lab-approval`, body: { safetyDataSheet: 'matrix' } }) },
  'DELETE /api/films/[id]/lab-approval': { guard: 'film.manage', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/lab-approval` }) },
  'POST /api/films/[id]/stock': { guard: 'film.manage', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/stock`, body: {} }) },
  'GET /api/films/[id]/test-grid': { guard: 'film.test', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/test-grid` }) },
  'GET /api/films/[id]/test-grid.svg': { guard: 'film.test', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/test-grid.svg` }) },
  'GET /api/films/[id]/test-grid.dxf': { guard: 'film.test', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/test-grid.dxf` }) },
  'POST /api/films/[id]/tests': { guard: 'film.test', scope: 'program', ask: (w) => ({ path: `/api/films/${t().film[w]}/tests`, body: {} }) },
  'GET /api/people': { guard: 'people.manage', ask: () => ({ path: '/api/people' }) },
  'PATCH /api/people/[id]': { guard: 'people.manage', scope: 'program', ask: (w) => ({ path: `/api/people/${t().person[w]}`, body: {} }) },
  // The role is validated before the person and team are looked up.
  'PUT /api/people/[id]/memberships/[teamId]': { guard: 'people.manage', ask: (w) => ({ path: `/api/people/${t().person[w]}/memberships/${t().team[w]}`, body: { role: 'captain' } }) },
  // The loner is in no team, so taking them out of one changes nothing.
  'DELETE /api/people/[id]/memberships/[teamId]': { guard: 'people.manage', scope: 'program', ask: (w) => ({ path: `/api/people/${t().person[w]}/memberships/${t().team[w]}` }) },
  'GET /api/invitations': { guard: 'people.manage', ask: () => ({ path: '/api/invitations' }) },
  'POST /api/invitations': { guard: 'people.manage', ask: () => ({ path: '/api/invitations', body: {} }) },
  'DELETE /api/invitations/[id]': { guard: 'people.manage', scope: 'program', ask: (w) => ({ path: `/api/invitations/${t().invitation[w]}` }) },
  'GET /api/audit': { guard: 'audit.view', ask: () => ({ path: '/api/audit' }) },
  'GET /api/mail': { guard: 'mail.view', ask: () => ({ path: '/api/mail' }) },
  // Everyone reads only their own messages: another person's is as missing as this one.
  'GET /api/mail/[id]': { guard: 'mail.view', missing: true, ask: () => ({ path: '/api/mail/2147483647' }) },
  'GET /api/outbox': { guard: 'outbox.view', ask: () => ({ path: '/api/outbox' }) },
  'POST /api/people/[id]/sign-out-everywhere': { guard: 'people.manage', scope: 'program', ask: (w) => ({ path: `/api/people/${t().person[w]}/sign-out-everywhere` }) },
  'PATCH /api/program': { guard: 'program.manage', ask: () => ({ path: '/api/program', body: {} }) },
  'GET /api/program/waiting': { guard: 'program.manage', ask: () => ({ path: '/api/program/waiting' }) },
  'GET /api/reviews': { guard: 'revision.review', ask: () => ({ path: '/api/reviews' }) },
  'GET /api/rule-profiles': { ask: () => ({ path: '/api/rule-profiles' }) },
  'POST /api/rule-profiles': { guard: 'program.manage', ask: () => ({ path: '/api/rule-profiles', body: {} }) },
  'GET /api/rule-profiles/[id]': { scope: 'program', ask: (w) => ({ path: `/api/rule-profiles/${t().ruleProfile[w]}` }) },
  'PATCH /api/rule-profiles/[id]': { guard: 'program.manage', scope: 'program', ask: (w) => ({ path: `/api/rule-profiles/${t().ruleProfile[w]}`, body: {} }) },
  'PUT /api/program/rule-profile': { guard: 'program.manage', ask: () => ({ path: '/api/program/rule-profile', body: {} }) },
  'POST /api/teams/[id]/plates/preview': { scope: 'team.view', action: 'artwork.upload', ask: (w) => ({ path: `/api/teams/${t().team[w]}/plates/preview`, body: { numeralHeightMm: -1 } }) },
  'POST /api/teams/[id]/plates': { scope: 'team.view', action: 'artwork.upload', ask: (w) => ({ path: `/api/teams/${t().team[w]}/plates`, body: { numeralHeightMm: -1 } }) },

  'POST /api/artworks': { scope: 'team.view', action: 'artwork.upload', ask: (w) => ({ path: '/api/artworks', upload: { teamId: t().team[w] } }) },
  'GET /api/artworks/[id]': { scope: 'artwork.view', ask: (w) => ({ path: `/api/artworks/${t().artwork[w]}` }) },
  'PATCH /api/artworks/[id]': { scope: 'artwork.view', action: 'artwork.revise', ask: (w) => ({ path: `/api/artworks/${t().artwork[w]}`, body: { title: '' } }) },
  'GET /api/artworks/[id]/history': { scope: 'artwork.view', ask: (w) => ({ path: `/api/artworks/${t().artwork[w]}/history` }) },
  'POST /api/artworks/[id]/preview': { scope: 'artwork.view', action: 'artwork.revise', ask: (w) => ({ path: `/api/artworks/${t().artwork[w]}/preview`, body: { widthMm: 0 } }) },
  'POST /api/artworks/[id]/revisions': { scope: 'artwork.view', action: 'artwork.revise', ask: (w) => ({ path: `/api/artworks/${t().artwork[w]}/revisions`, body: { widthMm: 0 } }) },
  'GET /api/revisions/[id]': { scope: 'artwork.view', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}` }) },
  'GET /api/revisions/[id]/vector.svg': { scope: 'artwork.view', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/vector.svg` }) },
  'GET /api/revisions/[id]/outline.svg': { scope: 'artwork.view', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/outline.svg` }) },
  'GET /api/revisions/[id]/prepared.png': { scope: 'artwork.view', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/prepared.png` }) },
  'GET /api/revisions/[id]/source': { scope: 'artwork.view', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/source` }) },
  // The matrix's revisions are one colour: layer 0 is missing for whoever gets past the scope (layers.test.ts reads real ones).
  'GET /api/revisions/[id]/layers/[position]/vector.svg': { scope: 'artwork.view', missing: true, ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/layers/0/vector.svg` }) },
  'GET /api/revisions/[id]/layers/[position]/outline.svg': { scope: 'artwork.view', missing: true, ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/layers/0/outline.svg` }) },
  'GET /api/revisions/[id]/layers/[position]/prepared.png': { scope: 'artwork.view', missing: true, ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/layers/0/prepared.png` }) },
  'POST /api/revisions/[id]/submit': { scope: 'artwork.view', action: 'revision.submit', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/submit` }) },
  'POST /api/revisions/[id]/review': { guard: 'revision.review', scope: 'artwork.view', ask: (w) => ({ path: `/api/revisions/${t().revision[w]}/review`, body: { decision: 'maybe' } }) },

  'POST /api/robots': { guard: 'robot.create', scope: 'team.view', ask: (w) => ({ path: '/api/robots', body: { teamId: t().team[w], name: unique(), season: '2026–27' } }) },
  'GET /api/robots/[id]': { scope: 'robot.view', ask: (w) => ({ path: `/api/robots/${t().robot[w]}` }) },
  'PATCH /api/robots/[id]': { scope: 'robot.view', action: 'robot.edit', ask: (w) => ({ path: `/api/robots/${t().robot[w]}`, body: {} }) },
  'GET /api/robots/[id]/history': { scope: 'robot.view', ask: (w) => ({ path: `/api/robots/${t().robot[w]}/history` }) },
  'GET /api/robots/[id]/plate-check': { scope: 'robot.view', ask: (w) => ({ path: `/api/robots/${t().robot[w]}/plate-check` }) },
  // The matrix's robots carry no plates: an allowed request is refused (409) and queues nothing.
  'POST /api/robots/[id]/event-kit': { scope: 'robot.view', action: 'placement.reprint', ask: (w) => ({ path: `/api/robots/${t().robot[w]}/event-kit` }) },
  'GET /api/robots/[id]/approved-revisions': { scope: 'robot.view', action: 'placement.create', ask: (w) => ({ path: `/api/robots/${t().robot[w]}/approved-revisions` }) },
  // A revision that is not approved: an allowed placement is refused further on (409 or 400), so nothing is placed.
  'POST /api/placements': {
    scope: 'robot.view', action: 'placement.create',
    ask: (w) => ({ path: '/api/placements', body: { robotId: t().robot[w], revisionId: t().draftRevision, filmId: t().film['own team'], spot: 'matrix', widthMm: 40, quantity: 1 } }),
  },
  'POST /api/placements/[id]/reprints': { scope: 'robot.view', action: 'placement.reprint', ask: (w) => ({ path: `/api/placements/${t().placement[w]}/reprints`, body: { quantity: 0 } }) },
  'POST /api/placements/[id]/spares': { scope: 'robot.view', action: 'placement.reprint', ask: (w) => ({ path: `/api/placements/${t().placement[w]}/spares`, body: { count: 0 } }) },
  'PATCH /api/placements/[id]': { scope: 'robot.view', action: 'placement.edit', ask: (w) => ({ path: `/api/placements/${t().placement[w]}`, body: {} }) },
  'DELETE /api/placements/[id]': { scope: 'robot.view', action: 'placement.edit', ask: (w) => ({ path: `/api/placements/${t().placement[w]}`, body: { reason: '' } }) },

  'GET /api/jobs': { guard: 'queue.work', ask: () => ({ path: '/api/jobs' }) },
  'GET /api/jobs/[id]': { scope: 'job.view', ask: (w) => ({ path: `/api/jobs/${t().job[w]}` }) },
  'GET /api/jobs/[id]/layers/[position]/vector.svg': { scope: 'job.view', missing: true, ask: (w) => ({ path: `/api/jobs/${t().job[w]}/layers/0/vector.svg` }) },
  'POST /api/jobs/[id]/state': { guard: 'queue.work', scope: 'job.view', ask: (w) => ({ path: `/api/jobs/${t().job[w]}/state`, body: { state: 'lost' } }) },
  'POST /api/jobs/[id]/cancel': { guard: 'queue.work', scope: 'job.view', ask: (w) => ({ path: `/api/jobs/${t().job[w]}/cancel`, body: { reason: '' } }) },
  'POST /api/jobs/[id]/failure': { guard: 'queue.work', scope: 'job.view', ask: (w) => ({ path: `/api/jobs/${t().job[w]}/failure`, body: { failure: 'exploded' } }) },
  'GET /api/jobs/[id]/cut-sheet.svg': { guard: 'queue.work', scope: 'job.view', ask: (w) => ({ path: `/api/jobs/${t().job[w]}/cut-sheet.svg?gap=-1` }) },
  // Batches are the program's: another program's is not found. Bodies and options are refused, and
  // a job not in the batch cannot leave it (409), so nothing changes.
  'GET /api/batches': { guard: 'queue.work', ask: () => ({ path: '/api/batches' }) },
  'POST /api/batches': { guard: 'queue.work', ask: () => ({ path: '/api/batches', body: { jobIds: [] } }) },
  'GET /api/batches/[id]': { guard: 'queue.work', scope: 'program', ask: (w) => ({ path: `/api/batches/${t().batch[w]}` }) },
  'POST /api/batches/[id]/cut': { guard: 'queue.work', scope: 'program', ask: (w) => ({ path: `/api/batches/${t().batch[w]}/cut`, body: { sheetsUsed: -1 } }) },
  'DELETE /api/batches/[id]/jobs/[jobId]': { guard: 'queue.work', scope: 'program', ask: (w) => ({ path: `/api/batches/${t().batch[w]}/jobs/${t().job[w]}` }) },
  'GET /api/batches/[id]/cut-sheet.svg': { guard: 'queue.work', scope: 'program', ask: (w) => ({ path: `/api/batches/${t().batch[w]}/cut-sheet.svg?gap=-1` }) },
  'GET /api/batches/[id]/cut-sheet.dxf': { guard: 'queue.work', scope: 'program', ask: (w) => ({ path: `/api/batches/${t().batch[w]}/cut-sheet.dxf?gap=-1` }) },
  'GET /api/jobs/[id]/cut-sheet.dxf': { guard: 'queue.work', scope: 'job.view', ask: (w) => ({ path: `/api/jobs/${t().job[w]}/cut-sheet.dxf?gap=-1` }) },
  'GET /api/work/[id]': { work: true, ask: (w) => ({ path: `/api/work/${t().work[w]}` }) },
  // Finished work cannot be cancelled (409), so nothing changes.
  'POST /api/work/[id]/cancel': { work: true, ask: (w) => ({ path: `/api/work/${t().work[w]}/cancel` }) },
  // Last: a session is a row on the server, so signing out ends it for every copy of the cookie.
  'POST /api/auth/sign-out': { fixed: PASS, ask: () => ({ path: '/api/auth/sign-out' }) },
}

/** What the policy says the answer must be. */
function expected(rule: RouteRule, who: Who, where: Where): Expected {
  if (rule.fixed !== undefined) return rule.fixed
  if (who === 'signed out') return 401
  const actor = actors[who]
  if (rule.guard && !can(actor, rule.guard)) return 403
  if (rule.missing) return 404
  if (rule.work) return canFollowWork(actor, things.workSubject[where]) ? PASS : 404
  if (rule.scope === 'program') return where === 'other program' ? 404 : PASS
  if (rule.scope) {
    const subject = things.subject[where]
    if (!can(actor, rule.scope, subject)) return 404
    if (rule.action && !can(actor, rule.action, subject)) return 403
  }
  return PASS
}

/** Each route file as "METHOD /api/path", e.g. server/api/teams/[id].patch.ts → "PATCH /api/teams/[id]". */
function routeFiles(dir = path.resolve('server/api'), prefix = '/api'): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name)
    if (statSync(full).isDirectory()) return routeFiles(full, `${prefix}/${name}`)
    const m = /^(.*?)(?:\.(get|post|put|patch|delete))?\.ts$/.exec(name)!
    const route = m[1] === 'index' ? prefix : `${prefix}/${m[1]}`
    return [`${(m[2] ?? 'get').toUpperCase()} ${route}`]
  })
}

async function ask(who: Who, method: string, a: Ask): Promise<Reply> {
  // A copy of the person's client; signing out ends the session itself (not only the cookie),
  // so that is asked in a session of its own.
  const c = new ApiClient()
  if (a.path === '/api/auth/sign-out' && who !== 'signed out') c.cookies = new Map((await signedIn(DEMO_ACCOUNTS[who].email, DEMO_PASSWORD)).cookies)
  else c.cookies = new Map(clients[who].cookies)
  if (a.upload) return uploadArtwork(c, { file: await drawing('png', 200, 140), title: unique(), teamId: a.upload.teamId, widthMm: 30 })
  return c.request(method, a.path, a.body)
}

describe('the policy, route by route', () => {
  it('has a rule for every route', () => {
    expect(Object.keys(ROUTES).sort()).toEqual(routeFiles().sort())
  })

  it('answers everyone as the policy says, about their own team\'s things, another team\'s and another program\'s', async () => {
    const wrong: string[] = []
    let asked = 0
    for (const [key, rule] of Object.entries(ROUTES)) {
      const method = key.split(' ')[0]!
      // The mentor last: an allowed request may change what it asks about (a withdrawn invitation).
      for (const who of WHO) {
        for (const where of WHERE) {
          const want = expected(rule, who, where)
          const r = await ask(who, method, rule.ask(where))
          asked++
          const ok = want === PASS ? ![401, 403, 404].includes(r.status) && r.status < 500 : r.status === want
          if (!ok) wrong.push(`${key} · ${who} · ${where}: expected ${want}, got ${r.status} ${JSON.stringify(r.body)?.slice(0, 160)}`)
        }
      }
    }
    expect(wrong).toEqual([])
    expect(asked).toBe(Object.keys(ROUTES).length * WHO.length * WHERE.length)
  })

  it('changed nothing it was not allowed to', async () => {
    // The other program's invitation is still open, its film unchanged, its team not renamed.
    const inv = await testDb().selectFrom('invitation').select('used_at').where('id', '=', things.invitation['other program']).executeTakeFirstOrThrow()
    expect(inv.used_at).toBeNull()
    const { n } = await testDb().selectFrom('audit_event').select(sql<number>`count(*)::int`.as('n'))
      .where('program_id', '=', things.subject['other program'].programId).executeTakeFirstOrThrow()
    expect(n).toBe(0)
  })
})
