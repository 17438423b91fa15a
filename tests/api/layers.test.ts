// A coloured drawing through the API: uploaded, it becomes a layered revision stored in
// PostgreSQL and the object store; the answers name its layers and colour; the stacked vector
// and each layer's vector download as SVG in mm, with the registration marks at the same
// place in every layer; each layer's ink matches the ink drawn; another program gets 404.
import { beforeAll, describe, expect, it } from 'vitest'
import sharp from 'sharp'
import { svgPathProperties } from 'svg-path-properties'
import { hashPassword } from '../../server/platform/passwords'
import { trimPixels } from '../../server/pipeline/colour/run-layers'
import type { RevisionDetail, ArtworkDetail } from '../../shared/types/artworks'
import { signedIn, type ApiClient } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { buildProgram } from '../support/fixtures'
import { allKeys } from '../support/s3'
import { uploadArtwork } from '../support/upload'
import { SHEET_INSET } from '../../server/pipeline/analyse'
import type { Camera } from '../unit/pipeline/hard-cases'
import { angledPhoto, photograph, threeInkDrawing, trueMasks, wrongOnSheet } from '../unit/pipeline/colour/drawing'

const WIDTH_MM = 120
const drawing = threeInkDrawing()
/** The drawing's ink each layer should be, by the name it is given. */
const INK_OF: Record<string, number> = { red: 0, blue: 1, yellow: 2 }

let student: ApiClient
let stranger: ApiClient
let revision: RevisionDetail

/** A file's bytes as the signed-in client gets them. */
async function bytes(c: ApiClient, path: string): Promise<Uint8Array> {
  const r = await fetch(new URL(path, c.baseUrl), { headers: { cookie: [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
  expect(r.status).toBe(200)
  return new Uint8Array(await r.arrayBuffer())
}

/** The SVG's width and height in mm (the root's attributes). */
function rootMm(svg: string) {
  const m = /<svg\b[^>]*\swidth="([\d.]+)mm"[^>]*\sheight="([\d.]+)mm"/.exec(svg)
  if (!m) throw new Error('no size in mm')
  return { widthMm: Number(m[1]), heightMm: Number(m[2]) }
}

/**
 * Every closed subpath of the SVG's paths with its box, read by svg-path-properties (npm), a
 * reading independent of our own path code: its segments in absolute coordinates, a new
 * subpath wherever one does not start where the last ended, each sampled every 0.01 mm.
 */
function subpathBoxes(svg: string) {
  const out: { x0: number; y0: number; x1: number; y1: number }[] = []
  for (const [, d] of svg.matchAll(/<path\b[^>]*\sd="([^"]*)"/g)) {
    let last: { x: number; y: number } | null = null
    let box = { x0: Infinity, y0: Infinity, x1: -Infinity, y1: -Infinity }
    for (const part of new svgPathProperties(d!).getParts()) {
      if (last && Math.hypot(part.start.x - last.x, part.start.y - last.y) > 1e-6) { out.push(box); box = { x0: Infinity, y0: Infinity, x1: -Infinity, y1: -Infinity } }
      for (let s = 0; s <= part.length; s += 0.01) {
        const p = part.getPointAtLength(s)
        box = { x0: Math.min(box.x0, p.x), y0: Math.min(box.y0, p.y), x1: Math.max(box.x1, p.x), y1: Math.max(box.y1, p.y) }
      }
      last = part.end
    }
    if (last) out.push(box)
  }
  return out
}

beforeAll(async () => {
  const db = testDb()
  const wrens = (await db.selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  const far = await buildProgram(db, { passwordHash: await hashPassword('far-away-password-1') })
  stranger = await signedIn(far.emails.get(far.mentor)!, 'far-away-password-1')
  const r = await uploadArtwork(student, { file: (await photograph(drawing)).jpeg, fileName: 'three-inks.jpg', title: `Three inks ${Date.now()}`, teamId: wrens, widthMm: WIDTH_MM })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  revision = r.body.revision
}, 120_000)

describe('an upload of a three-ink drawing', () => {
  it('answers a layered revision: three layers bottom first, the colour found, the totals', () => {
    expect(revision.layerCount).toBe(3)
    expect(revision.layers.map((l) => l.name)).toEqual(['yellow', 'red', 'blue'])
    expect(revision.layers.map((l) => l.position)).toEqual([0, 1, 2])
    expect(revision.colour!.sentence).toMatch(/^3 inks found: yellow, red and blue/)
    const sum = (k: 'cutLengthMm' | 'inkAreaMm2' | 'pieces') => revision.layers.reduce((s, l) => s + l.measurements[k], 0)
    expect(revision.measurements.cutLengthMm).toBeCloseTo(sum('cutLengthMm'), 1)
    expect(revision.measurements.inkAreaMm2).toBeCloseTo(sum('inkAreaMm2'), 1)
    expect(revision.measurements.pieces).toBe(sum('pieces'))
    expect(revision.measurements.narrowestFeatureMm).toBe(Math.min(...revision.layers.map((l) => l.measurements.narrowestFeatureMm!)))
    // The revision's size is the framed canvas; the drawing inside it is the width asked, plus a little paper.
    expect(revision.widthMm).toBe(revision.colour!.frame!.widthMm)
    expect(revision.colour!.frame!.drawingWidthMm).toBeGreaterThan(WIDTH_MM)
    expect(revision.colour!.frame!.drawingWidthMm).toBeLessThan(WIDTH_MM + 2)
  })

  it('is stored: the layers\' rows in PostgreSQL, their files in the object store', async () => {
    const db = testDb()
    const row = await db.selectFrom('revision').select(['layer_count', 'colour', 'vector_key']).where('id', '=', revision.id).executeTakeFirstOrThrow()
    expect(row.layer_count).toBe(3)
    expect(row.colour!.inks.map((i) => i.name)).toEqual(['yellow', 'red', 'blue'])
    const layers = await db.selectFrom('revision_layer').selectAll().where('revision_id', '=', revision.id).orderBy('position').execute()
    expect(layers.map((l) => l.hex)).toEqual(revision.layers.map((l) => l.hex))
    const keys = new Set(await allKeys())
    for (const l of layers) for (const k of [l.prepared_key!, l.outline_key!, l.vector_key]) expect(keys.has(k), k).toBe(true)
    expect(keys.has(row.vector_key)).toBe(true)
  })

  it('is the same in the revision\'s and the artwork\'s answers', async () => {
    const r = await student.get(`/api/revisions/${revision.id}`)
    expect(r.body.layers).toEqual(revision.layers)
    expect(r.body.colour).toEqual(revision.colour)
    const a = await student.get(`/api/artworks/${revision.artworkId}`)
    expect((a.body as ArtworkDetail).revisions[0]!.layers).toEqual(revision.layers)
  })

  it('downloads the stacked vector: one SVG in mm, a group per layer in its colour', async () => {
    const r = await student.get(revision.files.vector)
    expect(r.status).toBe(200)
    const svg = String(r.body)
    expect(rootMm(svg)).toEqual({ widthMm: revision.widthMm, heightMm: revision.heightMm })
    const groups = [...svg.matchAll(/<g id="dw-layer-(\d)" fill="(#[0-9a-f]{6})"/g)].map((m) => `${m[1]} ${m[2]}`)
    expect(groups).toEqual(revision.layers.map((l) => `${l.position + 1} ${l.hex}`))
  })

  it('downloads each layer alone, with the registration marks at the same coordinates (0.01 mm) in every layer', async () => {
    const svgs = await Promise.all(revision.layers.map(async (l) => {
      const r = await student.get(l.files.vector)
      expect(r.status).toBe(200)
      expect(r.headers.get('content-disposition')).toContain(`layer${l.position + 1}-${l.name}`)
      return String(r.body)
    }))
    for (const svg of svgs) expect(rootMm(svg)).toEqual({ widthMm: revision.widthMm, heightMm: revision.heightMm })
    const frame = revision.colour!.frame!
    expect(frame.marks).toHaveLength(3)
    const size = 6 // the default mark's outer diameter, mm
    const near = (b: { x0: number; y0: number; x1: number; y1: number }, m: { x: number; y: number }) =>
      b.x0 >= m.x - size / 2 - 0.05 && b.x1 <= m.x + size / 2 + 0.05 && b.y0 >= m.y - size / 2 - 0.05 && b.y1 <= m.y + size / 2 + 0.05
    const marksOf = svgs.map((svg) => subpathBoxes(svg).filter((b) => frame.marks.some((m) => near(b, m))))
    // At least one outline a mark (the notched ring is one closed outline).
    expect(marksOf[0]!.length).toBeGreaterThanOrEqual(frame.marks.length)
    for (const other of marksOf.slice(1)) {
      expect(other.length).toBe(marksOf[0]!.length)
      other.forEach((b, i) => {
        const a = marksOf[0]![i]!
        for (const k of ['x0', 'y0', 'x1', 'y1'] as const) expect(Math.abs(b[k] - a[k])).toBeLessThanOrEqual(0.01)
      })
    }
    // Each mark's outlines span its ring's diameter, centred where the frame says.
    for (const m of frame.marks) {
      const parts = marksOf[0]!.filter((b) => near(b, m))
      const box = { x0: Math.min(...parts.map((b) => b.x0)), y0: Math.min(...parts.map((b) => b.y0)), x1: Math.max(...parts.map((b) => b.x1)), y1: Math.max(...parts.map((b) => b.y1)) }
      expect(Math.abs(box.x1 - box.x0 - size)).toBeLessThan(0.05)
      expect(Math.abs(box.y1 - box.y0 - size)).toBeLessThan(0.05)
      expect(Math.abs((box.x0 + box.x1) / 2 - m.x)).toBeLessThan(0.05)
      expect(Math.abs((box.y0 + box.y1) / 2 - m.y)).toBeLessThan(0.05)
    }
  })

  it('separates each ink as drawn: at most 2 % of each layer\'s ink pixels wrong against its mask', async () => {
    const truth = await trueMasks(drawing)
    const trim = revision.colour!.trim!
    for (const [position, l] of revision.layers.entries()) {
      // Each pixel of the layer's prepared bitmap (black ink on white) against the drawing's
      // pixel under its centre, through the part of the source the drawing was cut from.
      const { data, info } = await sharp(Buffer.from(await bytes(student, l.files.prepared!))).greyscale().raw().toBuffer({ resolveWithObject: true })
      const mine = truth[INK_OF[l.name]!]!
      let wrong = 0, ink = 0
      for (let y = 0; y < info.height; y++) {
        const sy = Math.floor((trim.y + ((y + 0.5) / info.height) * trim.height) * drawing.height)
        for (let x = 0; x < info.width; x++) {
          const sx = Math.floor((trim.x + ((x + 0.5) / info.width) * trim.width) * drawing.width)
          const t = sy * drawing.width + sx
          const cut = data[(y * info.width + x) * info.channels]! < 128 ? 1 : 0
          if (mine[t]) ink++
          if (cut !== mine[t]) wrong++
        }
      }
      expect(wrong / ink, `layer ${position} ${l.name}`).toBeLessThanOrEqual(0.02)
    }
  }, 60_000)

  it('draws the stacked vector like the drawing: at most 2 % of its ink pixels a wrong colour', async () => {
    const truth = await trueMasks(drawing)
    const frame = revision.colour!.frame!
    const trim = trimPixels(revision.colour!.trim!, drawing.width, drawing.height)
    const kx = trim.width / frame.drawingWidthMm, ky = trim.height / frame.drawingHeightMm
    const svg = String((await student.get(revision.files.vector)).body)
      .replace(/width="[^"]*mm" height="[^"]*mm"/, `width="${Math.round(frame.widthMm * kx)}" height="${Math.round(frame.heightMm * ky)}" preserveAspectRatio="none"`)
    const { data, info } = await sharp(Buffer.from(svg))
      .extract({ left: Math.round(frame.shift.x * kx), top: Math.round(frame.shift.y * ky), width: trim.width, height: trim.height })
      .ensureAlpha().raw().toBuffer({ resolveWithObject: true })
    const rgbOf = revision.layers.map((l) => [1, 3, 5].map((o) => parseInt(l.hex.slice(o, o + 2), 16)))
    let wrong = 0, ink = 0
    for (let y = 0; y < trim.height; y++) {
      for (let x = 0; x < trim.width; x++) {
        const t = (y + trim.y) * drawing.width + x + trim.x
        const want = revision.layers.findIndex((l) => truth[INK_OF[l.name]!]![t])
        const p = (y * trim.width + x) * info.channels
        // The layer drawn here: nearest of the layers' colours, or none where it is clear.
        const got = data[p + 3]! < 128 ? -1 : rgbOf.map((c) => (c[0]! - data[p]!) ** 2 + (c[1]! - data[p + 1]!) ** 2 + (c[2]! - data[p + 2]!) ** 2)
          .reduce((b, d, i, a) => (d < a[b]! ? i : b), 0)
        if (want >= 0) ink++
        if (got !== want) wrong++
      }
    }
    expect(wrong / ink).toBeLessThanOrEqual(0.02)
  }, 60_000)

  it('keeps another program\'s layers from view: 404', async () => {
    expect((await stranger.get(`/api/revisions/${revision.id}/layers/0/vector.svg`)).status).toBe(404)
    expect((await stranger.get(`/api/revisions/${revision.id}/layers/1/prepared.png`)).status).toBe(404)
    expect((await student.get(`/api/revisions/${revision.id}/layers/3/vector.svg`)).status).toBe(404)
    expect((await student.get(`/api/revisions/${revision.id}/layers/2/outline.svg`)).status).toBe(200)
  })
})

describe('an upload of a three-ink drawing photographed at an angle', () => {
  // A pinhole camera over a table, the sheet tilted and turned: a known homography (hard-cases.ts).
  const camera: Camera = { width: 1600, height: 1200, focal: 1400, tiltDeg: 26, yawDeg: -9, rollDeg: 11, distanceMm: 320, shiftMm: [0, 2] }

  it('becomes layers separated on the sheet the clean-up straightened: each layer\'s ink pixels at most 2 % wrong against its mask', async () => {
    const wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
    const { jpeg, sheet } = await angledPhoto(drawing, camera)
    const r = await uploadArtwork(student, { file: jpeg, fileName: 'three-inks-at-an-angle.jpg', title: `Three inks at an angle ${Date.now()}`, teamId: wrens, widthMm: WIDTH_MM })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const angled: RevisionDetail = r.body.revision
    expect(angled.choices.find((c) => c.setting === 'corners')!.value).toMatchObject({ mode: 'manual' })
    expect(angled.layers.map((l) => l.name).sort()).toEqual(['blue', 'red', 'yellow'])
    expect(angled.colour!.straightened).toBe(true)
    const truth = await trueMasks(drawing)
    for (const l of angled.layers) {
      // Each pixel of the layer's prepared bitmap against the drawing's pixel under its centre,
      // through the straightened sheet (the trim is a rectangle of it).
      const { data, info } = await sharp(Buffer.from(await bytes(student, l.files.prepared!))).greyscale().raw().toBuffer({ resolveWithObject: true })
      const wrong = wrongOnSheet({ data, width: info.width, height: info.height, channels: info.channels }, truth[INK_OF[l.name]!]!, drawing, angled.colour!.trim!, sheet, SHEET_INSET)
      expect(wrong, l.name).toBeLessThanOrEqual(0.02)
    }
  }, 120_000)
})
