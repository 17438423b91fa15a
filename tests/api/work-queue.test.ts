// The work queue across processes: two app processes that run no jobs themselves
// (NUXT_WORK_IN_APP=0) and one `npm run worker` process, on the test run's database and object
// store. (The test run's own app also takes jobs; the flow holds whoever takes them.)
import { spawn, type ChildProcess } from 'node:child_process'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { sql } from 'kysely'
import { ApiClient, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { startExtraApp } from '../support/extra-app'
import { buildProgram } from '../support/fixtures'
import { hashPassword } from '../../server/platform/passwords'
import { drawing, noise } from '../support/images'
import { uploadArtwork } from '../support/upload'
import type { AppProcess } from '../../scripts/lib/app-process'

type Extra = AppProcess & { baseUrl: string }
let apps: Extra[] = []
let worker: ChildProcess | undefined
let wrens: number
let refusedId: number

/** `npm run worker` with the app's settings; resolves once it says it is taking work. */
function startWorker(): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn('npm', ['run', 'worker', '--silent'], { env: { ...process.env, ...inject('appEnv') }, stdio: ['ignore', 'pipe', 'pipe'] })
    let log = ''
    const timer = setTimeout(() => reject(new Error(`the worker did not start:\n${log}`)), 120_000)
    const read = (d: Buffer) => {
      if (process.env.DECALWRIGHT_TEST_LOGS) process.stderr.write(d)
      log += String(d)
      if (log.includes('is taking work from the queue')) {
        clearTimeout(timer)
        resolve(child)
      }
    }
    child.stdout.on('data', read)
    child.stderr.on('data', read)
    child.once('exit', (code) => { clearTimeout(timer); reject(new Error(`the worker exited (${code}):\n${log}`)) })
  })
}

/** The pid of the worker process holding the item's job, if a worker holds it. */
async function holder(workItemId: number): Promise<number | undefined> {
  const r = await sql<{ pid: number }>`select r.pid from graphile_worker._private_jobs j join work_runner r on r.worker_id = j.locked_by
    where j.key = ${`work-item-${workItemId}`}`.execute(testDb())
  return r.rows[0]?.pid
}

async function until<T>(what: string, check: () => Promise<T | undefined | false>, timeoutMs = 60_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const v = await check()
    if (v) return v
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 100))
  }
}

beforeAll(async () => {
  wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  apps = await Promise.all([startExtraApp({ NUXT_WORK_IN_APP: '0' }), startExtraApp({ NUXT_WORK_IN_APP: '0' })])
  worker = await startWorker()
}, 240_000)

afterAll(async () => {
  worker?.kill('SIGTERM')
  await Promise.all(apps.map((a) => a.stop()))
})

describe('the work queue', () => {
  it('carries a drawing from upload to cut sheet across two app processes and a worker', async () => {
    const [a, b] = apps as [Extra, Extra]
    const studentA = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: a.baseUrl })
    const mentorB = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD, { baseUrl: b.baseUrl })
    const up = await uploadArtwork(studentA, { file: await drawing('png', 600, 400), title: `Queued wren ${Date.now()}`, teamId: wrens, widthMm: 60 })
    expect(up.status, JSON.stringify(up.body)).toBe(201)
    // The same answer as ever: the artwork and its first revision.
    expect(up.body.artwork.title).toMatch(/^Queued wren/)
    expect(up.body.revision).toMatchObject({ number: 1, artworkId: up.body.artwork.id })
    const item = await testDb().selectFrom('work_item').selectAll().where(sql`(result->>'revisionId')::int`, '=', up.body.revision.id).executeTakeFirstOrThrow()
    expect(item).toMatchObject({ state: 'done', kind: 'upload', attempts: 1, percent: 100 })
    // The asker follows it through the other app.
    const followed = new ApiClient(b.baseUrl, studentA.options)
    followed.cookies = new Map(studentA.cookies)
    expect((await followed.get(`/api/work/${item.id}`)).body).toMatchObject({ state: 'done', result: { artworkId: up.body.artwork.id, revisionId: up.body.revision.id } })

    // A later revision, asked at the second app.
    const designerB = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD, { baseUrl: b.baseUrl })
    const rev = await designerB.post(`/api/artworks/${up.body.artwork.id}/revisions`, { settings: {}, widthMm: 55 })
    expect(rev.status, JSON.stringify(rev.body)).toBe(201)
    expect(rev.body).toMatchObject({ number: 2, artworkId: up.body.artwork.id })

    expect((await studentA.post(`/api/revisions/${rev.body.id}/submit`)).status).toBeLessThan(300)
    expect((await mentorB.post(`/api/revisions/${rev.body.id}/review`, { decision: 'approve' })).status).toBeLessThan(300)
    const robot = await mentorB.post('/api/robots', { teamId: wrens, name: `Queue bot ${Date.now()}`, season: '2026–27' })
    expect(robot.status, JSON.stringify(robot.body)).toBe(201)
    const pet = await testDb().selectFrom('film').select('id').where('name', '=', 'Matte black polyester film').executeTakeFirstOrThrow()
    const mentorA = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD, { baseUrl: a.baseUrl })
    const placed = await mentorA.post('/api/placements', { robotId: robot.body.id, revisionId: rev.body.id, filmId: pet.id, spot: 'rear bumper', widthMm: 40, quantity: 2 })
    expect(placed.status, JSON.stringify(placed.body)).toBe(201)
    const operatorB = await signedIn(DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD, { baseUrl: b.baseUrl })
    const jobId = placed.body.jobs[0].id
    const sheet = await operatorB.request('GET', `/api/jobs/${jobId}/cut-sheet.svg`)
    expect(sheet.status).toBe(200)
    // Built as a work item by whoever took it (the apps asked run none), waited for by the request.
    expect(sheet.headers.get('x-sheet-from')).toBe('built')
    const operatorId = (await testDb().selectFrom('users').select('id').where('email', '=', DEMO_ACCOUNTS.operator.email).executeTakeFirstOrThrow()).id
    const sheetItem = await testDb().selectFrom('work_item').select(['state', 'attempts', 'result']).where('kind', '=', 'cut-sheet').where('asked_by', '=', operatorId)
      .orderBy('id', 'desc').executeTakeFirstOrThrow()
    expect(sheetItem).toMatchObject({ state: 'done', attempts: 1, result: { sheets: 1 } })

    // Asked at one app without waiting (as the job page asks), followed at the other, then read back from the store at either.
    const operatorA = await signedIn(DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD, { baseUrl: a.baseUrl })
    const asked = await operatorA.request('GET', `/api/jobs/${jobId}/cut-sheet.dxf?gap=6`, undefined, { prefer: 'respond-async' })
    expect(asked.status, JSON.stringify(asked.body)).toBe(202)
    expect(asked.headers.get('location')).toBe(`/api/work/${asked.body.workItem.id}`)
    expect(asked.body.workItem).toMatchObject({ kind: 'cut-sheet' })
    const built = await until('the cut sheet to be built', async () => {
      const w = await operatorB.get(`/api/work/${asked.body.workItem.id}`)
      return w.body.state === 'done' || w.body.state === 'failed' ? w.body : undefined
    })
    expect(built).toMatchObject({ state: 'done', phase: 'finished', percent: 100, result: { sheets: 1 } })
    for (const [client, format] of [[operatorA, 'dxf'], [operatorB, 'svg']] as const) {
      const kept = await client.request('GET', `/api/jobs/${jobId}/cut-sheet.${format}?gap=6`, undefined, { prefer: 'respond-async' })
      expect(kept.status, format).toBe(200)
      expect(kept.headers.get('x-sheet-from'), format).toBe('store')
    }
  }, 180_000)

  it('answers 202 with the work item when the work outlasts the wait, and the item then shows the result', async () => {
    const impatient = await startExtraApp({ NUXT_WORK_IN_APP: '0', NUXT_WORK_WAIT_MS: '1' })
    try {
      const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: impatient.baseUrl })
      const r = await uploadArtwork(student, { file: await drawing('png', 640, 420), title: `Patient wren ${Date.now()}`, teamId: wrens, widthMm: 50 })
      expect(r.status, JSON.stringify(r.body)).toBe(202)
      expect(r.headers.get('location')).toBe(`/api/work/${r.body.workItem.id}`)
      expect(['queued', 'running']).toContain(r.body.workItem.state)
      const done = await until('the work to finish', async () => {
        const w = await student.get(r.headers.get('location')!)
        return w.body.state === 'done' ? w.body : undefined
      })
      expect(done).toMatchObject({ kind: 'upload', percent: 100, phase: 'finished', error: null })
      const artwork = await student.get(`/api/artworks/${done.result.artworkId}`)
      expect(artwork.status).toBe(200)
      expect(artwork.body.revisions.map((x: { id: number }) => x.id)).toEqual([done.result.revisionId])
    } finally {
      await impatient.stop()
    }
  }, 120_000)

  it('answers a picture that cannot become a decal with the same 422 as before', async () => {
    const studentA = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: apps[0]!.baseUrl })
    const title = `Static ${Date.now()}`
    const r = await uploadArtwork(studentA, { file: await noise(1000, 1000), title, teamId: wrens, widthMm: 100 })
    expect(r.status).toBe(422)
    expect(r.body.data).toEqual({ kind: 'not-a-drawing' })
    expect(r.body.message).toMatch(/raise the speck filter/)
    const failed = await testDb().selectFrom('work_item').select(['id', 'state', 'attempts', 'error']).where(sql`input->>'title'`, '=', title).executeTakeFirstOrThrow()
    refusedId = failed.id
    // Refused once, not tried again.
    expect(failed).toMatchObject({ state: 'failed', attempts: 1, error: { status: 422 } })
  }, 120_000)

  it('hides work from a mentor of another program (404), shows it to the asker', async () => {
    const password = 'fixture-password-123'
    const far = await buildProgram(testDb(), { passwordHash: await hashPassword(password) })
    const farMentor = await signedIn(far.emails.get(far.mentor)!, password)
    const id = refusedId
    expect((await farMentor.get(`/api/work/${id}`)).status).toBe(404)
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    expect((await student.get(`/api/work/${id}`)).status).toBe(200)
  })

  it('cancels queued work for the person who asked, removing its job, and for nobody else', async () => {
    const db = testDb()
    const asker = await db.selectFrom('users').select(['id', 'program_id']).where('email', '=', DEMO_ACCOUNTS.student.email).executeTakeFirstOrThrow()
    const { id } = await db.insertInto('work_item').values({ program_id: asker.program_id, kind: 'revise', asked_by: asker.id, input: '{}' }).returning('id').executeTakeFirstOrThrow()
    // Due in an hour, so no runner takes it meanwhile.
    await sql`select graphile_worker.add_job('make-revision', ${JSON.stringify({ workItemId: id })}::json, run_at => now() + interval '1 hour', job_key => ${`work-item-${id}`}::text)`.execute(db)
    const jobs = async () => (await sql<{ n: number }>`select count(*)::int as n from graphile_worker._private_jobs where key = ${`work-item-${id}`}`.execute(db)).rows[0]!.n
    expect(await jobs()).toBe(1)
    const designer = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    expect((await designer.post(`/api/work/${id}/cancel`)).status).toBe(404)
    expect((await mentor.get(`/api/work/${id}`)).body).toMatchObject({ state: 'queued', can: { cancel: false } })
    expect((await mentor.post(`/api/work/${id}/cancel`)).status).toBe(403)
    expect((await student.get(`/api/work/${id}`)).body).toMatchObject({ state: 'queued', can: { cancel: true } })
    const r = await student.post(`/api/work/${id}/cancel`)
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body).toMatchObject({ state: 'failed', error: { data: { cancelled: true } } })
    expect(await jobs()).toBe(0)
    expect((await student.post(`/api/work/${id}/cancel`)).status).toBe(409)
  })

  it('tries a job again when the worker running it is killed, once a worker is back', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: apps[1]!.baseUrl })
    // The test run's own app takes jobs too: send uploads until one lands in the worker.
    let caught: { id: number } | undefined
    for (let i = 0; i < 8 && !caught; i++) {
      const send = uploadArtwork(student, { file: await drawing('png', 3000 + i, 2000), title: `Interrupted ${Date.now()}`, teamId: wrens, widthMm: 200 })
      const id = await until('the work item', async () => (await testDb().selectFrom('work_item').select('id').where('asked_by', '=', sql<number>`(select id from users where email = ${DEMO_ACCOUNTS.student.email})`)
        .where('state', '=', 'running').orderBy('id', 'desc').executeTakeFirst())?.id)
      const pid = await until('a holder', () => holder(id).then((p) => p ?? false))
      if (pid !== worker!.pid && !(await isChild(pid))) {
        await send
        continue
      }
      process.kill(pid, 'SIGKILL')
      caught = { id }
      worker = await startWorker()
      const answer = await send
      // The request may still be waiting at its limit; either way the item finishes.
      expect([201, 202]).toContain(answer.status)
    }
    expect(caught, 'no upload landed in the worker process').toBeDefined()
    const done = await until('the retried item', async () => {
      const r = await testDb().selectFrom('work_item').select(['state', 'attempts']).where('id', '=', caught!.id).executeTakeFirstOrThrow()
      return r.state === 'done' || r.state === 'failed' ? r : undefined
    }, 120_000)
    expect(done).toEqual({ state: 'done', attempts: 2 })
  }, 300_000)
})

/** Whether `pid` is a process under the worker's npm (npm → sh → tsx → node). */
async function isChild(pid: number): Promise<boolean> {
  const { readFile } = await import('node:fs/promises')
  let p = pid
  for (let i = 0; i < 6 && p > 1; i++) {
    if (p === worker?.pid) return true
    const stat = await readFile(`/proc/${p}/stat`, 'utf8').catch(() => '')
    p = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1])
  }
  return false
}
