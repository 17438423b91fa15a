// Straightening a sheet photographed at an angle.
//
// A plate 120 × 80 mm with a filled square in each corner is drawn on an A5 sheet, and the
// sheet is photographed by a pinhole camera (known homography, the principal point at the
// picture's centre) on a dark table. At upload defaults the plate must come back within
// 0.5 % of its true size and each corner square within 1 mm of where it belongs.
import { describe, expect, it } from 'vitest'
import { homographyFromPoints, type Mat3 } from '../../../server/pipeline/homography'
import { prepareBitmap, prepareDrawing } from '../../../server/pipeline/prepare'
import { findPieces } from '../../../server/pipeline/components'
import { sheetAspect, sheetFrame, type Quad } from '../../../server/pipeline/sheet'
import { cameraHomography, finish, light, photograph, project, renderSheet, type Camera, type Sheet } from './hard-cases'
import { python } from './python'

const SHEET_W = 148, SHEET_H = 210
const PLATE = { x: 14, y: 50, w: 120, h: 80 }
const SQUARE = 10
const body = (c: string) => {
  const { x, y, w, h } = PLATE
  return `<path fill-rule="evenodd" fill="${c}" d="M${x} ${y}h${w}v${h}h${-w}Z M${x + 3} ${y + 3}v${h - 6}h${w - 6}v${-(h - 6)}Z"/>`
    + [[x + 6, y + 6], [x + w - 6 - SQUARE, y + 6], [x + w - 6 - SQUARE, y + h - 6 - SQUARE], [x + 6, y + h - 6 - SQUARE]]
      .map(([sx, sy]) => `<rect x="${sx}" y="${sy}" width="${SQUARE}" height="${SQUARE}" fill="${c}"/>`).join('')
      + `<circle cx="${x + w / 2}" cy="${y + h / 2}" r="14" fill="${c}"/>`
}
/** Centres of the corner squares, mm from the plate's top-left corner. */
const TRUE_CENTRES = [[6 + SQUARE / 2, 6 + SQUARE / 2], [PLATE.w - 6 - SQUARE / 2, 6 + SQUARE / 2], [PLATE.w - 6 - SQUARE / 2, PLATE.h - 6 - SQUARE / 2], [6 + SQUARE / 2, PLATE.h - 6 - SQUARE / 2]]

const CAMERA: Camera = { width: 1600, height: 1200, focal: 1350, tiltDeg: 32, yawDeg: 12, rollDeg: -14, distanceMm: 300, shiftMm: [0, 4] }

async function photo(): Promise<{ jpeg: Buffer, H: number[] }> {
  const sheet: Sheet = { widthMm: SHEET_W, heightMm: SHEET_H, paper: [244, 242, 236], drawing: body('#1d1d22'), ink: body('#000') }
  const flat = await renderSheet(sheet, 8)
  const shot = photograph(flat, 8, SHEET_W, SHEET_H, CAMERA, (x, y) => { const k = 0.9 + 0.1 * Math.sin(x * 0.02 + y * 0.013); return [70 * k, 72 * k, 78 * k] })
  light(shot, (x, y) => 1 - 0.2 * x * y)
  return { jpeg: await finish(shot, { blur: 0.6, noise: 3, seed: 31, quality: 90 }), H: shot.H }
}

describe('straightening a sheet photographed at an angle', () => {
  it('brings the drawing back within 0.5 % of its size and 1 mm at the corners', async () => {
    const { jpeg, H } = await photo()
    const p = await prepareDrawing(jpeg, {}, PLATE.w)
    const corners = p.choices.find((c) => c.setting === 'corners')!
    expect(corners.value.mode).toBe('manual')

    // The sheet's corners where the camera put them (the test's own projection).
    const truth = [[0, 0], [SHEET_W, 0], [SHEET_W, SHEET_H], [0, SHEET_H]].map(([u, v]) => project(H, u!, v!))
    const found = (corners.value as { points: { x: number, y: number }[] }).points
    for (let i = 0; i < 4; i++) expect(Math.hypot(found[i]!.x - truth[i]![0]!, found[i]!.y - truth[i]![1]!)).toBeLessThan(2.5)

    // Size: the width is the one asked for, the height the plate's within 0.5 %.
    expect(Math.abs(p.widthMm - PLATE.w)).toBeLessThan(0.01)
    expect(Math.abs(p.heightMm / PLATE.h - 1)).toBeLessThanOrEqual(0.005)

    // Corner squares: centroids of the four pieces nearest the corners, in mm.
    const { pieces, labels } = findPieces(p.bitmap, p.width, p.height)
    const sums = pieces.map(() => ({ x: 0, y: 0, n: 0 }))
    for (let y = 0; y < p.height; y++) for (let x = 0; x < p.width; x++) {
      const l = labels[y * p.width + x]!
      if (l) { sums[l - 1]!.x += x + 0.5; sums[l - 1]!.y += y + 0.5; sums[l - 1]!.n++ }
    }
    const centres = sums.filter((s, i) => pieces[i]!.area > 0.5 * (SQUARE * p.pxPerMm) ** 2 && pieces[i]!.area < 2 * (SQUARE * p.pxPerMm) ** 2)
      .map((s) => [s.x / s.n / p.pxPerMm, s.y / s.n / p.pxPerMm])
    const misses = TRUE_CENTRES.map(([tx, ty]) => Math.min(...centres.map(([x, y]) => Math.hypot(x! - tx!, y! - ty!))))
    console.info(`straightened: ${p.widthMm.toFixed(2)} × ${p.heightMm.toFixed(2)} mm (true ${PLATE.w} × ${PLATE.h}); corner squares off by ${misses.map((m) => m.toFixed(2)).join(', ')} mm`)
    for (const m of misses) expect(m).toBeLessThanOrEqual(1)
  })

  it('the proportions of a photographed rectangle from the camera model, exactly', () => {
    // Zhang & He (2007): with the principal point known, the rectangle's aspect follows from
    // its photographed corners alone. Checked on the camera model of this file, at several poses.
    for (const [tilt, yaw, roll] of [[32, 12, -14], [0, 0, 5], [45, -20, 30], [10, 35, 0]] as const) {
      const H = cameraHomography({ ...CAMERA, tiltDeg: tilt, yawDeg: yaw, rollDeg: roll }, SHEET_W, SHEET_H)
      const q = [[0, 0], [SHEET_W, 0], [SHEET_W, SHEET_H], [0, SHEET_H]].map(([u, v]) => { const [x, y] = project(H, u!, v!); return { x, y } }) as Quad
      const { aspect } = sheetAspect(q, CAMERA.width / 2, CAMERA.height / 2, CAMERA.width)
      expect(Math.abs(aspect / (SHEET_W / SHEET_H) - 1)).toBeLessThan(1e-6)
    }
  })

  it('the straightening homography agrees with scikit-image\'s ProjectiveTransform on the same point pairs', async () => {
    // Reference: skimage.transform.ProjectiveTransform.estimate (Debian python3-skimage).
    const { jpeg } = await photo()
    const p = await prepareBitmap(jpeg, {}, SHEET_W)
    const pts = (p.choices.find((c) => c.setting === 'corners')!.value as { points: { x: number, y: number }[] }).points as Quad
    const frame = sheetFrame(pts, CAMERA.width / 2, CAMERA.height / 2, CAMERA.width)
    const rect = [{ x: 0, y: 0 }, { x: frame.width, y: 0 }, { x: frame.width, y: frame.height }, { x: 0, y: frame.height }]
    const ours = homographyFromPoints(rect, pts)
    const script = `
import json, sys
import numpy as np
from skimage.transform import ProjectiveTransform
d = json.load(sys.stdin)
t = ProjectiveTransform()
t.estimate(np.array([[p['x'], p['y']] for p in d['src']]), np.array([[p['x'], p['y']] for p in d['dst']]))
print(json.dumps((t.params / t.params[2, 2]).flatten().tolist()))`
    const theirs = JSON.parse(python(script, JSON.stringify({ src: rect, dst: pts })).toString()) as Mat3
    for (let k = 0; k < 9; k++) expect(Math.abs(ours[k]! - theirs[k]!)).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(theirs[k]!)))
    // The frame the pipeline used is that homography (inset a little from the sheet's edge).
    expect(frame.aspect).toBeCloseTo(SHEET_W / SHEET_H, 2)
  })

  it('turns by quarter turns and a fine angle', async () => {
    const { jpeg } = await photo()
    const upright = await prepareDrawing(jpeg, {}, PLATE.w)
    const quarter = await prepareDrawing(jpeg, { quarterTurns: 1 }, PLATE.h)
    // a quarter turn swaps the plate's sides
    expect(Math.abs(quarter.heightMm / PLATE.w - 1)).toBeLessThanOrEqual(0.005)
    expect(quarter.choices.find((c) => c.setting === 'corners')!.value).toEqual(upright.choices.find((c) => c.setting === 'corners')!.value)
    // a 30° turn: the plate's box grows to w cos 30° + h sin 30° across
    const turned = await prepareDrawing(jpeg, { fineAngleDeg: 30 }, 100)
    const c = Math.cos(Math.PI / 6), s = Math.sin(Math.PI / 6)
    expect(Math.abs(turned.heightMm / 100 - (PLATE.w * s + PLATE.h * c) / (PLATE.w * c + PLATE.h * s))).toBeLessThan(0.01)
  })
})
