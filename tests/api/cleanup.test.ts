// The automatic clean-up through the API: what each revision chose and why, every choice
// overridden, straightening, turning, margin and thickening, refusals, and the tuning bench's
// preview against the revision it saves.
import { beforeAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import sharp from 'sharp'
import type { CleanUpChoice } from '../../shared/types/pipeline'
import type { ApiClient } from '../support/client'
import { signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { allKeys } from '../support/s3'
import { uploadArtwork } from '../support/upload'
import { inkBoxMm, scene, skewedWithShadow } from '../unit/pipeline/hard-cases'

let wrens: number
let student: ApiClient
let designer: ApiClient

const SETTINGS_ORDER = ['corners', 'lightingEvening', 'inkColour', 'dropoutColour', 'paperLines', 'threshold', 'thickenToMm', 'marginMm']
const choiceOf = (choices: CleanUpChoice[], setting: string) => choices.find((c) => c.setting === setting)!

async function rowCounts() {
  const db = testDb()
  const [a, s, r] = await Promise.all(['artwork', 'source', 'revision'].map((t) =>
    db.selectFrom(t as 'artwork').select(sql<number>`count(*)::int`.as('n')).executeTakeFirstOrThrow()))
  return { artworks: a!.n, sources: s!.n, revisions: r!.n }
}

async function upload(file: Uint8Array, title: string, widthMm: number) {
  const r = await uploadArtwork(student, { file, title: `${title} ${Date.now()}`, teamId: wrens, widthMm })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body as { artwork: { id: number }; revision: any }
}

const revise = (artworkId: number, settings: Record<string, unknown>, widthMm: number) =>
  designer.post(`/api/artworks/${artworkId}/revisions`, { settings, widthMm })

beforeAll(async () => {
  wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  designer = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
})

describe('what the clean-up chose, and why', () => {
  let artworkId: number
  let first: any
  beforeAll(async () => {
    const up = await upload(await drawing('png', 1200, 800), 'Choices', 100)
    artworkId = up.artwork.id
    first = up.revision
  })

  it('is stored with the revision and returned with it, one line per choice', async () => {
    expect(first.choices.map((c: CleanUpChoice) => c.setting)).toEqual(SETTINGS_ORDER)
    for (const c of first.choices as CleanUpChoice[]) expect(c.reason, c.setting).toMatch(/^[A-Z].*\.$/)
    // A flat scan of dark ink on even paper: nothing to straighten, evening off, one level.
    expect(choiceOf(first.choices, 'corners')).toMatchObject({ automatic: true, value: { mode: 'off' } })
    expect(choiceOf(first.choices, 'lightingEvening')).toMatchObject({ automatic: true, value: { mode: 'off' } })
    expect(choiceOf(first.choices, 'threshold')).toMatchObject({ automatic: true, value: { mode: 'otsu' } })
    expect(choiceOf(first.choices, 'marginMm')).toMatchObject({ automatic: false, value: 0, reason: expect.stringMatching(/^Trimmed to the drawing's ink, 100\.0 × 75\.\d mm, with no margin\.$/) })
    const again = await designer.get(`/api/revisions/${first.id}`)
    expect(again.body.choices).toEqual(first.choices)
    const row = await testDb().selectFrom('revision').select(['choices', 'drawing_width_mm']).where('id', '=', first.id).executeTakeFirstOrThrow()
    expect(row.choices).toEqual(first.choices)
    expect(row.drawing_width_mm).toBe(100)
  })

  it('can be overridden choice by choice; each override is reported as set, with the value given', async () => {
    const overrides: Record<string, unknown> = {
      corners: { mode: 'manual', points: [{ x: 20, y: 10 }, { x: 1180, y: 12 }, { x: 1190, y: 790 }, { x: 12, y: 785 }] },
      lightingEvening: { mode: 'on', strength: 0.6 },
      inkColour: 'colour',
      dropoutColour: { mode: 'colours', colours: ['#3366cc'] },
      paperLines: 'remove',
      threshold: { mode: 'adaptive', windowMm: 12, k: 0.25, r: 100 },
    }
    for (const [setting, value] of Object.entries(overrides)) {
      const r = await revise(artworkId, { [setting]: value }, 100)
      expect(r.status, `${setting}: ${JSON.stringify(r.body)}`).toBe(201)
      const c = choiceOf(r.body.choices, setting)
      expect(c, setting).toMatchObject({ automatic: false, value })
      expect(c.reason, setting).toMatch(/as set|set/)
      // the other choices stay the pipeline's own
      for (const other of r.body.choices as CleanUpChoice[]) {
        if (other.setting !== setting && other.setting !== 'thickenToMm' && other.setting !== 'marginMm') expect(other.automatic, `${setting} → ${other.setting}`).toBe(true)
      }
    }
    // Every choice of revision 1 written back: the same decal, every choice now "as set".
    const pinned = Object.fromEntries((first.choices as CleanUpChoice[]).map((c) => [c.setting, c.value]))
    const same = await revise(artworkId, pinned, 100)
    expect(same.status).toBe(201)
    expect((same.body.choices as CleanUpChoice[]).every((c) => !c.automatic)).toBe(true)
    expect(same.body.measurements).toEqual(first.measurements)
  })
})

describe('straightening, turning, margin and thickening', () => {
  it('straightens a photo taken at an angle from the corners it finds, or from corners given', async () => {
    const c = await skewedWithShadow()
    const truth = await inkBoxMm(c.sheet)
    const up = await upload(c.source, 'Skewed', c.widthMm)
    const found = choiceOf(up.revision.choices, 'corners')
    expect(found).toMatchObject({ automatic: true, value: { mode: 'manual' } })
    expect(found.reason).toMatch(/photographed at an angle/)
    // Straightened: the drawing's proportions within 1 % (the perspective check of the
    // pipeline's own tests is 0.5 % of the size; the height here also carries the trim).
    expect(Math.abs(up.revision.heightMm / (c.widthMm * truth.h / truth.w) - 1)).toBeLessThan(0.01)

    // Taken as it is, the photo shows the table around the sheet: refused, with its reason.
    const off = await revise(up.artwork.id, { corners: { mode: 'off' } }, c.widthMm)
    console.info(`skewed photo, corners off: ${off.status} ${off.body.message ?? `${off.body.widthMm} × ${off.body.heightMm} mm`}`)
    // A corner set in the wrong place (the bottom right one pulled 60 px in) straightens it
    // into another shape.
    const points = (found.value as { points: { x: number; y: number }[] }).points
    const wrong = points.map((p, i) => (i === 2 ? { x: p.x - 60, y: p.y - 60 } : p))
    const skew = await revise(up.artwork.id, { corners: { mode: 'manual', points: wrong } }, c.widthMm)
    expect(skew.status, JSON.stringify(skew.body)).toBe(201)
    expect(choiceOf(skew.body.choices, 'corners')).toMatchObject({ automatic: false, value: { mode: 'manual', points: wrong } })
    expect(Math.abs(skew.body.heightMm / up.revision.heightMm - 1)).toBeGreaterThan(0.03)
    // The found corners given back by hand: the same decal as found.
    const given = await revise(up.artwork.id, { corners: found.value }, c.widthMm)
    expect(given.status).toBe(201)
    expect(choiceOf(given.body.choices, 'corners')).toMatchObject({ automatic: false, value: found.value })
    expect(given.body.measurements).toEqual(up.revision.measurements)
  })

  it('turns by quarter turns and a fine angle, adds a margin, and keeps the drawing\'s width', async () => {
    const up = await upload(await drawing('png', 1200, 800), 'Turned', 120)
    const ink = { w: 676, h: 512 } // drawingSvg's ring and bar, px
    const turned = await revise(up.artwork.id, { quarterTurns: 1 }, 120)
    expect(turned.status).toBe(201)
    expect(turned.body.widthMm).toBe(120)
    expect(Math.abs(turned.body.heightMm - (120 * ink.w) / ink.h)).toBeLessThan(0.3)
    const fine = await revise(up.artwork.id, { fineAngleDeg: 10 }, 120)
    expect(fine.status).toBe(201)
    // Turned by 10°, the ink's box is that of the ring (centre (420, 400), radius 256 px),
    // which keeps its extent, and of the bar's four corners turned (plane rotation).
    const t = (10 * Math.PI) / 180
    const turn = (x: number, y: number) => [x * Math.cos(t) - y * Math.sin(t), x * Math.sin(t) + y * Math.cos(t)] as const
    const [cx, cy] = turn(420, 400)
    const pts = [[cx - 256, cy - 256], [cx + 256, cy + 256], ...[[744, 160], [840, 160], [840, 640], [744, 640]].map(([x, y]) => turn(x!, y!))]
    const extent = (k: 0 | 1) => Math.max(...pts.map((q) => q[k]!)) - Math.min(...pts.map((q) => q[k]!))
    expect(Math.abs(fine.body.heightMm / ((120 * extent(1)) / extent(0)) - 1)).toBeLessThan(0.01)
    const margin = await revise(up.artwork.id, { marginMm: 5 }, 120)
    expect(margin.status).toBe(201)
    expect(margin.body.drawingWidthMm).toBe(120)
    expect(Math.abs(margin.body.widthMm - 130)).toBeLessThan(0.1)
    expect(Math.abs(margin.body.heightMm - (up.revision.heightMm + 10))).toBeLessThan(0.2)
    expect(choiceOf(margin.body.choices, 'marginMm').reason).toMatch(/with 5\.0 mm of paper on every side/)
    // the artwork's list shows the drawing's width beside the decal's size
    const list = (await designer.get(`/api/artworks/${up.artwork.id}`)).body.revisions
    expect(list[0]).toMatchObject({ number: 4, drawingWidthMm: 120 })
    expect(list[0].widthMm).toBeCloseTo(130, 0)
  })

  it('thickens a thin-line drawing to a width in mm, as asked, and says so', async () => {
    // Lines 3 px wide on a 1200 px drawing 120 mm wide: 0.3 mm strokes.
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1300" height="900"><rect width="100%" height="100%" fill="#f4f1ea"/>
      <g fill="none" stroke="#222" stroke-width="3"><path d="M50 850 L50 50 L1250 50"/><path d="M200 700 C400 150 800 900 1100 250"/></g>
      <circle cx="500" cy="550" r="90" fill="#222"/></svg>`
    const up = await upload(await sharp(Buffer.from(svg)).png().toBuffer(), 'Pencil', 120)
    expect(up.revision.measurements.narrowestFeatureMm).toBeLessThan(0.45)
    const r = await revise(up.artwork.id, { thickenToMm: 0.8 }, 120)
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const m = r.body.measurements
    // measured on what will be cut (the clean vector rasterised back)
    expect(m.narrowestFeatureMm).toBeGreaterThanOrEqual(0.8)
    expect(r.body.widthMm).toBe(120)
    expect(choiceOf(r.body.choices, 'thickenToMm')).toMatchObject({ automatic: false, value: 0.8 })
    expect(r.body.settings.thickenToMm).toBe(0.8)
    const bad = await revise(up.artwork.id, { thickenToMm: 0 }, 120)
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.thickenToMm).toBeDefined()
  })
})

describe('what cannot become a decal', () => {
  it('a photograph of a scene and a blank page are refused with their sentence, and nothing is stored', async () => {
    const before = { rows: await rowCounts(), keys: await allKeys() }
    const s = await scene()
    const refused = await uploadArtwork(student, { file: s.source, title: 'Holiday', teamId: wrens, widthMm: 100 })
    expect(refused.status).toBe(422)
    expect(refused.body.data).toEqual({ kind: 'not-a-drawing' })
    expect(refused.body.message).toMatch(/^This looks like a photograph of a scene, not a drawing: .*Draw the design on plain paper/)
    const blank = await sharp({ create: { width: 900, height: 600, channels: 3, background: '#f2efe8' } }).png().toBuffer()
    const empty = await uploadArtwork(student, { file: blank, title: 'Blank', teamId: wrens, widthMm: 100 })
    expect(empty.status).toBe(422)
    expect(empty.body.message).toMatch(/^No drawing was found/)
    const tiny = await sharp({ create: { width: 5, height: 5, channels: 3, background: '#000000' } }).png().toBuffer()
    const small = await uploadArtwork(student, { file: tiny, title: 'Tiny', teamId: wrens, widthMm: 100 })
    expect(small.status).toBe(422)
    expect(small.body.message).toMatch(/at least 16 pixels on each side/)
    expect({ rows: await rowCounts(), keys: await allKeys() }).toEqual(before)
  })

  it('reads a light drawing on a see-through background from its transparency, as the same drawing in black', async () => {
    // Shapes in `fill` on a transparent page (librsvg through sharp), as a tablet exports them.
    const clear = (fill: string) => sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="900" height="600"><g fill="${fill}">
      <text x="60" y="170" font-family="DejaVu Sans" font-weight="bold" font-size="130">W 8</text>
      <path fill-rule="evenodd" d="M600 150a160 160 0 1 0 1 0zM600 240a70 70 0 1 0 1 0z"/></g></svg>`)).png().toBuffer()
    const light = await upload(await clear('#ffffff'), 'Chalk', 100)
    const dark = await upload(await clear('#000000'), 'Ink', 100)
    expect(choiceOf(light.revision.choices, 'inkColour').reason).toMatch(/^The drawing is light on a see-through background, so its shapes are read from the transparency\./)
    expect(choiceOf(dark.revision.choices, 'inkColour').reason).not.toMatch(/see-through/)
    for (const k of ['pieces', 'holes', 'widthMm', 'heightMm']) expect(light.revision.measurements[k], k).toEqual(dark.revision.measurements[k])
    expect(light.revision.measurements.pieces).toBe(3) // W, 8 and the ring
  })
})

describe('the tuning bench\'s preview and the revision it saves', () => {
  it('gives the same choices, size and pieces, and estimates of the rest, on the same settings', async () => {
    const c = await skewedWithShadow()
    const up = await upload(c.source, 'Preview against saved', 90)
    const settings = { speckFilterMm2: 1, cornerRounding: 0.8 }
    const preview = await designer.post(`/api/artworks/${up.artwork.id}/preview`, { settings, widthMm: 90 })
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    const saved = await revise(up.artwork.id, settings, 90)
    expect(saved.status).toBe(201)
    const p = preview.body.measurements, s = saved.body.measurements
    console.info(`preview ${p.pxPerMm.toFixed(2)} px/mm against saved ${s.pxPerMm.toFixed(2)} px/mm: `
      + `${p.widthMm} × ${p.heightMm} vs ${s.widthMm} × ${s.heightMm} mm; ink ${p.inkAreaMm2.toFixed(0)} vs ${s.inkAreaMm2.toFixed(0)} mm²; `
      + `cut ${p.cutLengthMm.toFixed(0)} vs ${s.cutLengthMm.toFixed(0)} mm; nodes ${p.nodes} vs ${s.nodes}; narrowest ${p.narrowestFeatureMm?.toFixed(2)} vs ${s.narrowestFeatureMm?.toFixed(2)} mm`)
    // The preview works on a coarser bitmap (the bench says its figures are estimates).
    expect(p.pxPerMm).toBeLessThanOrEqual(6)
    expect(s.pxPerMm).toBeGreaterThanOrEqual(10)
    // The same choices, the corners given back in the source's own pixels (within a few pixels
    // of those found on the full photo: the preview starts from a copy 1280 px long).
    const pc = preview.body.choices as CleanUpChoice[], sc = saved.body.choices as CleanUpChoice[]
    expect(pc.map((x) => [x.setting, x.automatic])).toEqual(sc.map((x) => [x.setting, x.automatic]))
    for (const x of pc) if (x.setting !== 'corners' && x.setting !== 'marginMm') expect(x.value, x.setting).toEqual(choiceOf(sc, x.setting).value)
    const pp = (choiceOf(pc, 'corners').value as { points: { x: number; y: number }[] }).points
    const sp = (choiceOf(sc, 'corners').value as { points: { x: number; y: number }[] }).points
    pp.forEach((q, i) => expect(Math.hypot(q.x - sp[i]!.x, q.y - sp[i]!.y), `corner ${i}`).toBeLessThan(6))
    // Size and pieces agree; areas and lengths within 2 %; the narrowest stroke within the
    // preview's own reading error (a pixel and a half at its resolution).
    expect(p.widthMm).toBe(s.widthMm)
    expect(Math.abs(p.heightMm / s.heightMm - 1)).toBeLessThan(0.01)
    expect([p.pieces, p.holes]).toEqual([s.pieces, s.holes])
    expect(Math.abs(p.inkAreaMm2 / s.inkAreaMm2 - 1)).toBeLessThan(0.02)
    expect(Math.abs(p.cutLengthMm / s.cutLengthMm - 1)).toBeLessThan(0.02)
    expect(Math.abs(p.narrowestFeatureMm - s.narrowestFeatureMm)).toBeLessThanOrEqual(1.5 / p.pxPerMm)
  })
})
