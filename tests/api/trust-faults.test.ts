// A failing network: a stalled database or object store answers 503 with a sentence within
// seconds and the app recovers by itself; a database failure during an upload leaves no
// objects behind, without deleting what a concurrent upload of the same bytes stored; and
// objects nobody points at are swept once they are old enough.
import { CreateBucketCommand, PutObjectCommand, HeadObjectCommand, S3Client } from '@aws-sdk/client-s3'
import { sql } from 'kysely'
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest'
import { signedIn } from '../support/client'
import { freshDatabase, testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { sparePort, startExtraApp } from '../support/extra-app'
import { teamId } from '../support/scenario'
import { drawing } from '../support/images'
import { pauseProxy } from '../support/pause-proxy'
import { allKeys } from '../support/s3'
import { uploadArtwork } from '../support/upload'

const stops: (() => Promise<void>)[] = []
afterAll(async () => { for (const s of stops.reverse()) await s() })

async function timed(url: string): Promise<{ status: number; ms: number; body: any }> {
  const t0 = Date.now()
  const r = await fetch(url, { headers: { accept: 'application/json', cookie: cookieJar }, signal: AbortSignal.timeout(60_000) })
  const text = await r.text()
  let body: any = text
  try { body = JSON.parse(text) } catch { /* not JSON */ }
  return { status: r.status, ms: Date.now() - t0, body }
}
let cookieJar = ''

describe('stalled services', () => {
  let app: Awaited<ReturnType<typeof startExtraApp>>
  let db: Awaited<ReturnType<typeof pauseProxy>>
  let s3: Awaited<ReturnType<typeof pauseProxy>>
  let vectorPath: string

  beforeAll(async () => {
    const dbUrl = new URL(inject('databaseUrl'))
    db = await pauseProxy({ host: '127.0.0.1', port: Number(dbUrl.port) }, await sparePort())
    const s3Url = new URL(inject('s3').endpoint)
    s3 = await pauseProxy({ host: '127.0.0.1', port: Number(s3Url.port) }, await sparePort())
    stops.push(db.close, s3.close)
    dbUrl.port = String(db.port)
    app = await startExtraApp({
      NUXT_DATABASE_URL: dbUrl.toString(),
      NUXT_S3_ENDPOINT: `http://127.0.0.1:${s3.port}`,
      // Short enough for a test; the defaults are in the README.
      NUXT_DB_QUERY_TIMEOUT_MS: '3000',
      NUXT_S3_TIMEOUT_MS: '3000',
    })
    stops.push(app.stop)
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: app.baseUrl })
    cookieJar = [...student.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    const up = await uploadArtwork(student, { file: await drawing('png', 300, 200), title: `Stall ${Date.now()}`, teamId: await teamId() })
    expect(up.status).toBe(201)
    vectorPath = `${app.baseUrl}/api/revisions/${up.body.revision.id}/vector.svg`
  })

  it('a paused object store: 503 with a sentence within seconds, then recovery', async () => {
    s3.pause()
    const stalled = await timed(vectorPath)
    s3.resume()
    expect(stalled.status).toBe(503)
    expect(stalled.body.message).toMatch(/file store|object stor/i)
    expect(stalled.ms).toBeLessThan(15_000)
    expect((await timed(vectorPath)).status).toBe(200)
  })

  it('a paused database: 503 with a sentence within seconds, then recovery', async () => {
    db.pause()
    const stalled = await timed(`${app.baseUrl}/api/artworks`)
    db.resume()
    expect(stalled.status).toBe(503)
    expect(stalled.body.message).toMatch(/database/i)
    expect(stalled.ms).toBeLessThan(15_000)
    // The pool drops the stalled connections and the next request works.
    let status = 0
    for (let i = 0; i < 20 && status !== 200; i++) {
      status = (await timed(`${app.baseUrl}/api/artworks`)).status
      if (status !== 200) await new Promise((r) => setTimeout(r, 500))
    }
    expect(status).toBe(200)
  })
})

describe('objects and failures', () => {
  const trigger = 'dw_test_fail_source'

  beforeAll(async () => {
    const db = testDb()
    await sql.raw(`create or replace function ${trigger}() returns trigger language plpgsql as $$
      begin if new.file_name like 'fail-me%' then raise exception 'the test makes this insert fail'; end if; return new; end $$`).execute(db)
    await sql.raw(`create trigger ${trigger} before insert on source for each row execute function ${trigger}()`).execute(db)
  })
  afterAll(async () => {
    await sql.raw(`drop trigger if exists ${trigger} on source`).execute(testDb())
  })

  it('a database failure during an upload leaves no objects behind', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const before = await allKeys()
    const r = await uploadArtwork(student, { file: await drawing('png', 333, 222), fileName: 'fail-me.png', title: 'Doomed', teamId: await teamId() })
    expect(r.status).toBeGreaterThanOrEqual(500)
    expect(await allKeys()).toEqual(before)
  })

  it('a failing upload does not remove what a concurrent upload of the same bytes stored', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const bytes = await drawing('png', 345, 234)
    const wrens = await teamId()
    const [bad, good] = await Promise.all([
      uploadArtwork(student, { file: bytes, fileName: 'fail-me-too.png', title: 'Doomed twin', teamId: wrens }),
      uploadArtwork(student, { file: bytes, fileName: 'fine.png', title: 'Lucky twin', teamId: wrens }),
    ])
    expect(bad.status).toBeGreaterThanOrEqual(500)
    expect(good.status).toBe(201)
    for (const file of ['vector.svg', 'prepared.png', 'outline.svg', 'source']) {
      expect((await student.request('GET', `/api/revisions/${good.body.revision.id}/${file}`)).status, file).toBe(200)
    }
  })

  it('objects that nothing points at are swept once old enough; others stay', async () => {
    const c = inject('s3')
    const bucket = `sweep-${Date.now()}`
    const s3 = new S3Client({ endpoint: c.endpoint, region: 'us-east-1', forcePathStyle: true, credentials: { accessKeyId: c.accessKeyId, secretAccessKey: c.secretAccessKey } })
    await s3.send(new CreateBucketCommand({ Bucket: bucket }))
    const app = await startExtraApp({
      NUXT_DATABASE_URL: await freshDatabase('sweep'),
      NUXT_S3_BUCKET: bucket,
      NUXT_ORPHAN_MIN_AGE_S: '2',
      NUXT_ORPHAN_SWEEP_INTERVAL_S: '1',
    })
    stops.push(app.stop)
    await s3.send(new PutObjectCommand({ Bucket: bucket, Key: 'sources/stray-object-nobody-points-at', Body: 'stray' }))
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: app.baseUrl })
    const up = await uploadArtwork(student, { file: await drawing('png', 310, 210), title: 'Kept', teamId: 1 })
    expect(up.status, JSON.stringify(up.body)).toBe(201)
    const exists = async (key: string) => s3.send(new HeadObjectCommand({ Bucket: bucket, Key: key })).then(() => true, () => false)
    const deadline = Date.now() + 20_000
    while (await exists('sources/stray-object-nobody-points-at')) {
      if (Date.now() > deadline) throw new Error('the stray object was not swept')
      await new Promise((r) => setTimeout(r, 500))
    }
    expect((await student.request('GET', `/api/revisions/${up.body.revision.id}/source`)).status).toBe(200)
    expect((await student.request('GET', `/api/revisions/${up.body.revision.id}/vector.svg`)).status).toBe(200)
  })
})
