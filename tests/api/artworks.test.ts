import { createHash } from 'node:crypto'
import { describe, expect, it, beforeAll } from 'vitest'
import sharp from 'sharp'
import { sql } from 'kysely'
import { ApiClient, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing, noise } from '../support/images'
import { allKeys } from '../support/s3'
import { uploadArtwork } from '../support/upload'

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex')
let wrens: number
let sprockets: number
let student: ApiClient
let designer: ApiClient

async function rowCounts() {
  const db = testDb()
  const [a, s, r] = await Promise.all(['artwork', 'source', 'revision'].map((t) =>
    db.selectFrom(t as 'artwork').select(sql<number>`count(*)::int`.as('n')).executeTakeFirstOrThrow()))
  return { artworks: a!.n, sources: s!.n, revisions: r!.n }
}

async function bytesOf(c: ApiClient, path: string) {
  const r = await fetch(new URL(path, c.baseUrl), { headers: { cookie: [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
  return { status: r.status, type: r.headers.get('content-type'), disposition: r.headers.get('content-disposition'), bytes: new Uint8Array(await r.arrayBuffer()) }
}

beforeAll(async () => {
  const db = testDb()
  wrens = (await db.selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  sprockets = (await db.selectFrom('team').select('id').where('name', '=', 'Tidewater Sprockets').executeTakeFirstOrThrow()).id
  student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  designer = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
})

describe('uploading a drawing', () => {
  it('makes revision 1 with a clean vector in millimetres and keeps the original byte for byte', async () => {
    const file = await drawing('png', 1200, 800)
    const r = await uploadArtwork(student, { file, title: 'Wren on a gear', teamId: wrens, widthMm: 120, fileName: 'wren.png' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const { artwork, revision } = r.body
    expect(artwork).toMatchObject({ title: 'Wren on a gear', status: 'draft', team: { id: wrens }, author: DEMO_ACCOUNTS.student.name, revisionCount: 1 })
    expect(revision.number).toBe(1)
    // The decal is trimmed to the drawing: the ink (ring and bar, drawingSvg) is 676 × 512 px of
    // the 1200 × 800 px picture, so 120 mm wide → 90.9 mm high (anti-aliased edges: ± 0.1 mm).
    expect(revision.widthMm).toBe(120)
    expect(revision.drawingWidthMm).toBe(120)
    expect(Math.abs(revision.heightMm - (120 * 512) / 676)).toBeLessThan(0.1)
    const m = revision.measurements
    expect(m.pieces).toBe(2)
    expect(m.holes).toBe(1)
    expect(m.fidelity).toBeGreaterThan(0.99)
    // About 10 px/mm: the working grid is made at 10, and trimming to the ink's exact width
    // moves the scale by a fraction of a pixel across the drawing.
    expect(m.pxPerMm).toBeGreaterThan(9.9)
    expect(m.narrowestFeatureMm).toBeGreaterThan(5)
    expect(revision.engineVersions.potrace).toBe('2.1.8')
    expect(revision.source).toMatchObject({ mediaType: 'image/png', fileName: 'wren.png', widthPx: 1200, heightPx: 800, bytes: file.byteLength, contentHash: sha256(file) })

    const source = await bytesOf(student, revision.files.source)
    expect(source.type).toBe('image/png')
    expect(sha256(source.bytes)).toBe(sha256(file))
    expect((await allKeys())).toContain(`sources/${sha256(file)}`)

    const vector = await bytesOf(student, revision.files.vector)
    expect(vector.type).toBe('image/svg+xml')
    expect(vector.disposition).toMatch(/filename="wren-on-a-gear-r1\.svg"/)
    const svg = new TextDecoder().decode(vector.bytes)
    expect(svg).toMatch(/width="120mm"/)
    expect(svg).toContain(`height="${revision.heightMm}mm"`)
    expect(svg).toContain(`viewBox="0 0 120 ${revision.heightMm}"`)
    const prepared = await bytesOf(student, revision.files.prepared)
    expect(prepared.type).toBe('image/png')
    const meta = await sharp(prepared.bytes).metadata()
    expect(meta.width).toBe(m.preparedWidthPx)
  })

  it('stores the same bytes once, however often they are uploaded', async () => {
    const file = await drawing('jpeg', 900, 600)
    const a = await uploadArtwork(student, { file, title: 'Twice A', teamId: wrens })
    const b = await uploadArtwork(student, { file, title: 'Twice B', teamId: wrens })
    expect(a.status).toBe(201)
    expect(b.status).toBe(201)
    expect((await allKeys()).filter((k) => k === `sources/${sha256(file)}`)).toHaveLength(1)
    // The same source and default settings give the same vector bytes: the same stored object.
    const [va, vb] = await Promise.all([bytesOf(student, a.body.revision.files.vector), bytesOf(student, b.body.revision.files.vector)])
    expect(sha256(va.bytes)).toBe(sha256(vb.bytes))
  })

  it.each(['jpeg', 'webp', 'tiff', 'gif', 'avif'] as const)('takes %s, decided by content, not by name', async (format) => {
    const file = await drawing(format, 600, 400)
    const r = await uploadArtwork(student, { file, title: `As ${format}`, teamId: wrens, fileName: 'misnamed.txt' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.revision.source.mediaType).toBe(`image/${format}`)
    expect(r.body.revision.measurements.pieces).toBe(2)
  })

  it('turns a phone photo upright by its orientation tag', async () => {
    // EXIF orientation 6: the stored pixels are to be turned 90° clockwise for display (TIFF/EXIF 2.3, Orientation tag).
    const file = await sharp(await drawing('png', 1200, 800)).jpeg().withMetadata({ orientation: 6 }).toBuffer()
    const r = await uploadArtwork(student, { file, title: 'Sideways photo', teamId: wrens, widthMm: 80 })
    expect(r.status).toBe(201)
    expect(r.body.revision.source).toMatchObject({ widthPx: 800, heightPx: 1200 })
    // Upright, the drawing's ink is 512 × 676 px: 80 mm wide → 105.6 mm high (± 0.2 mm).
    expect(r.body.revision.widthMm).toBe(80)
    expect(Math.abs(r.body.revision.heightMm - (80 * 676) / 512)).toBeLessThan(0.2)
  })

  it('refuses what is not a picture we take with 415, and leaves nothing behind', async () => {
    const before = { rows: await rowCounts(), keys: await allKeys() }
    const text = await uploadArtwork(student, { file: new TextEncoder().encode('just some words, not a picture'), title: 'Words', teamId: wrens, fileName: 'logo.png' })
    expect(text.status).toBe(415)
    expect(text.body.message).toMatch(/JPEG, PNG, WebP, TIFF, GIF or AVIF/)
    const svg = await uploadArtwork(student, { file: new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"/>'), title: 'Vector', teamId: wrens })
    expect(svg.status).toBe(415)
    expect({ rows: await rowCounts(), keys: await allKeys() }).toEqual(before)
  })

  it('refuses a damaged picture and a huge one with 422, an oversized file with 413', async () => {
    const before = { rows: await rowCounts(), keys: await allKeys() }
    const jpeg = await drawing('jpeg', 1200, 800)
    const truncated = await uploadArtwork(student, { file: jpeg.subarray(0, Math.floor(jpeg.length / 2)), title: 'Torn', teamId: wrens })
    expect(truncated.status, JSON.stringify(truncated.body)).toBe(422)
    const huge = await sharp({ create: { width: 8000, height: 8000, channels: 3, background: '#ffffff' } }).png().toBuffer()
    const big = await uploadArtwork(student, { file: huge, title: 'Huge', teamId: wrens })
    expect(big.status).toBe(422)
    expect(big.body.message).toMatch(/64 megapixels; the limit is 60/)
    const oversized = await uploadArtwork(student, { file: new Uint8Array(26 * 1024 * 1024), title: 'Too big', teamId: wrens })
    expect(oversized.status).toBe(413)
    expect({ rows: await rowCounts(), keys: await allKeys() }).toEqual(before)
  })

  it('answers missing fields with field errors, another team with 404, and signed-out with 401', async () => {
    const file = await drawing('png', 300, 200)
    const missing = await uploadArtwork(student, { file: new Uint8Array(), title: '', teamId: '', widthMm: 'wide' })
    expect(missing.status).toBe(400)
    expect(Object.keys(missing.body.data.fieldErrors).sort()).toEqual(['file', 'teamId', 'title', 'widthMm'])
    expect((await uploadArtwork(student, { file, title: 'Not ours', teamId: sprockets })).status).toBe(404)
    expect((await uploadArtwork(new ApiClient(), { file, title: 'Anyone', teamId: wrens })).status).toBe(401)
  })

  it('refuses salt-and-pepper noise as specks with 422, names the setting to change, and stores nothing', async () => {
    const before = { rows: await rowCounts(), keys: await allKeys() }
    const r = await uploadArtwork(student, { file: await noise(1000, 1000), title: 'Static', teamId: wrens, widthMm: 100 })
    expect(r.status).toBe(422)
    // Not traced at all: most of its pieces would be lost when weeding.
    expect(r.body.data).toEqual({ kind: 'not-a-drawing' })
    expect(r.body.message).toMatch(/^Most of the \d+ pieces would be smaller than 1 mm² .*raise the speck filter/)
    expect({ rows: await rowCounts(), keys: await allKeys() }).toEqual(before)
  })
})

describe('revisions', () => {
  let artworkId: number
  beforeAll(async () => {
    const r = await uploadArtwork(student, { file: await drawing('png', 1000, 700), title: 'Gear badge', teamId: wrens, widthMm: 100 })
    artworkId = r.body.artwork.id
  })

  it('a designer saves new settings and size as revision 2; revision 1 stays as it was', async () => {
    const first = (await designer.get(`/api/artworks/${artworkId}`)).body.revisions[0]
    const r = await designer.post(`/api/artworks/${artworkId}/revisions`, { settings: { threshold: { mode: 'manual', value: 90 }, cornerRounding: 0.5 }, widthMm: 200 })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.number).toBe(2)
    expect(r.body.widthMm).toBe(200)
    expect(r.body.settings).toMatchObject({ threshold: { mode: 'manual', value: 90 }, cornerRounding: 0.5 })
    expect(r.body.measurements.threshold).toBe(90)
    const detail = (await designer.get(`/api/artworks/${artworkId}`)).body
    expect(detail.revisions.map((x: any) => x.number)).toEqual([2, 1])
    expect(detail.revisions[1]).toEqual(first)
    expect(detail.artwork.latestRevision.number).toBe(2)
    const one = await designer.get(`/api/revisions/${first.id}`)
    expect(one.body.number).toBe(1)
  })

  it('is immutable in the database itself', async () => {
    const rev = await testDb().selectFrom('revision').select('id').where('artwork_id', '=', artworkId).executeTakeFirstOrThrow()
    await expect(sql`update revision set width_mm = 1 where id = ${rev.id}`.execute(testDb())).rejects.toThrow(/immutable/)
  })

  it('numbers revisions saved at the same moment one after another', async () => {
    const saves = await Promise.all([60, 70, 80].map((w) => designer.post(`/api/artworks/${artworkId}/revisions`, { settings: {}, widthMm: w })))
    expect(saves.map((s) => s.status)).toEqual([201, 201, 201])
    expect(saves.map((s) => s.body.number).sort()).toEqual([3, 4, 5])
  })

  it('refuses bad settings with 400, a student with 403, another team with 404', async () => {
    const bad = await designer.post(`/api/artworks/${artworkId}/revisions`, { settings: { cornerRounding: 9 }, widthMm: 100 })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.cornerRounding).toBeDefined()
    expect((await designer.post(`/api/artworks/${artworkId}/revisions`, { settings: {}, widthMm: 0 })).status).toBe(400)
    expect((await student.post(`/api/artworks/${artworkId}/revisions`, { settings: {}, widthMm: 100 })).status).toBe(403)
    const other = await signedIn('juniper@harbourline.example', DEMO_PASSWORD)
    expect((await other.post(`/api/artworks/${artworkId}/revisions`, { settings: {}, widthMm: 100 })).status).toBe(404)
    expect((await other.get(`/api/artworks/${artworkId}`)).status).toBe(404)
    const revId = (await designer.get(`/api/artworks/${artworkId}`)).body.revisions[0].id
    expect((await other.get(`/api/revisions/${revId}`)).status).toBe(404)
    expect((await bytesOf(other, `/api/revisions/${revId}/vector.svg`)).status).toBe(404)
  })

  it('previews without storing anything', async () => {
    const before = { rows: await rowCounts(), keys: await allKeys() }
    const p = await designer.post(`/api/artworks/${artworkId}/preview`, { settings: { threshold: { mode: 'manual', value: 120 } }, widthMm: 100 })
    expect(p.status, JSON.stringify(p.body)).toBe(200)
    expect(p.body.svg).toMatch(/^<svg[^>]+width="100mm"/)
    expect(p.body.preparedPng).toMatch(/^data:image\/png;base64,/)
    expect(p.body.histogram).toHaveLength(256)
    // The histogram is of the grey reading the threshold saw: the drawing and a little paper
    // round it, before the trim.
    const { preparedWidthPx, preparedHeightPx } = p.body.measurements
    expect(p.body.histogram.reduce((a: number, b: number) => a + b, 0)).toBeGreaterThanOrEqual(preparedWidthPx * preparedHeightPx)
    expect(p.body.measurements.threshold).toBe(120)
    expect({ rows: await rowCounts(), keys: await allKeys() }).toEqual(before)
  })
})

describe('the artwork list', () => {
  it('filters by team, searches titles and pages with a cursor', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const tag = `Heron${Date.now()}`
    for (const n of [1, 2, 3]) expect((await uploadArtwork(student, { file: await drawing('png', 300 + n, 200), title: `${tag} ${n}`, teamId: wrens })).status).toBe(201)
    const page1 = (await mentor.get(`/api/artworks?q=${tag}&limit=2`)).body
    expect(page1.total).toBe(3)
    expect(page1.items.map((i: any) => i.title)).toEqual([`${tag} 3`, `${tag} 2`])
    expect(page1.nextCursor).toEqual(expect.any(String))
    // A change after the first page was read moves nothing already seen into the next one.
    await uploadArtwork(student, { file: await drawing('png', 310, 200), title: `${tag} 4`, teamId: wrens })
    const page2 = (await mentor.get(`/api/artworks?q=${tag}&limit=2&cursor=${encodeURIComponent(page1.nextCursor)}`)).body
    expect(page2.items.map((i: any) => i.title)).toEqual([`${tag} 1`])
    expect(page2.nextCursor).toBeNull()
    expect((await mentor.get(`/api/artworks?teamId=${sprockets}&q=${tag}`)).body.total).toBe(0)
    const other = await signedIn('juniper@harbourline.example', DEMO_PASSWORD)
    expect((await other.get(`/api/artworks?q=${tag}`)).body.total).toBe(0)
    expect((await mentor.get('/api/artworks?limit=0')).status).toBe(400)
    expect((await mentor.get('/api/artworks?cursor=not-a-cursor')).status).toBe(400)
  })
})
