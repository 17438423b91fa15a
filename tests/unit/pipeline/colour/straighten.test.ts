// A coloured drawing photographed at an angle: the colour layers are separated on the sheet the
// one-colour clean-up straightened (the same corners, the same homography), so each layer lines
// up with the straightened drawing. The photo is made in code by a pinhole camera through a
// known homography (hard-cases.ts).
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { SHEET_INSET } from '../../../../server/pipeline/analyse'
import { colourFrame, sourceToFrame } from '../../../../server/pipeline/colour/straighten'
import { colourWork } from '../../../../server/pipeline/colour/tasks'
import { layeredUpload } from '../../../../server/pipeline/colour/upload'
import { runPipeline } from '../../../../server/pipeline/run'
import { parseSettings } from '../../../../shared/utils/settings'
import { cameraHomography, project, type Camera } from '../hard-cases'
import { angledPhoto, threeInkDrawing, trueMasks, wrongOnSheet } from './drawing'

const CAMERA: Camera = { width: 1600, height: 1200, focal: 1400, tiltDeg: 28, yawDeg: 10, rollDeg: -12, distanceMm: 320, shiftMm: [0, 3] }
/** The drawing's ink each layer should be, by the name it is given. */
const INK_OF: Record<string, number> = { red: 0, blue: 1, yellow: 2 }

describe('the colour layers of a photo taken at an angle', () => {
  it('read the frame the corners give: a point of the sheet lands where the camera\'s own homography says', () => {
    const W = 200, Hmm = 150
    const H = cameraHomography(CAMERA, W, Hmm)
    const corners = [[0, 0], [W, 0], [W, Hmm], [0, Hmm]].map(([u, v]) => { const [x, y] = project(H, u!, v!); return { x, y } })
    const settings = parseSettings({ corners: { mode: 'manual', points: corners } })
    const frame = colourFrame(settings, { width: CAMERA.width, height: CAMERA.height }, null)!
    expect(frame).not.toBeNull()
    // Every point of the sheet (mm) photographed (the test's projection), then read back into
    // the frame, sits at its place on the sheet less the inset edge, within a pixel of the
    // frame (whose sides are rounded to whole pixels).
    for (const [u, v] of [[20, 15], [100, 75], [180, 30], [37, 140]] as const) {
      const [x, y] = project(H, u, v)
      const f = sourceToFrame(frame, { x, y }, null)
      expect(Math.abs(f.x - frame.width * (u / W - SHEET_INSET) / (1 - 2 * SHEET_INSET))).toBeLessThan(1)
      expect(Math.abs(f.y - frame.height * (v / Hmm - SHEET_INSET) / (1 - 2 * SHEET_INSET))).toBeLessThan(1)
    }
    // Nothing to straighten or turn: the source as it is.
    expect(colourFrame(parseSettings({}), { width: 100, height: 80 }, null)).toBeNull()
  })

  it('separate the three inks on the straightened sheet: each layer\'s ink pixels at most 2 % wrong against its mask', async () => {
    const drawing = threeInkDrawing()
    const { jpeg, sheet } = await angledPhoto(drawing, CAMERA)
    const req = { source: jpeg, settings: {}, widthMm: 120, purpose: 'revision' as const }
    const single = await runPipeline(req)
    const corners = single.choices.find((c) => c.setting === 'corners')!
    expect(corners.value).toMatchObject({ mode: 'manual' })
    const d = await layeredUpload(colourWork, req, single.choices)
    if (d.kind !== 'layers') throw new Error(d.why)
    expect(d.result.layers.map((l) => l.name).sort()).toEqual(['blue', 'red', 'yellow'])
    expect(d.colour.straightened).toBe(true)
    const truth = await trueMasks(drawing)
    for (const l of d.result.layers) {
      const { data, info } = await sharp(l.preparedPng).greyscale().raw().toBuffer({ resolveWithObject: true })
      const wrong = wrongOnSheet({ data, width: info.width, height: info.height, channels: info.channels }, truth[INK_OF[l.name]!]!, drawing, d.colour.trim!, sheet, SHEET_INSET)
      console.info(`${l.name}: ${(wrong * 100).toFixed(2)} % of its ink pixels wrong`)
      expect(wrong, l.name).toBeLessThanOrEqual(0.02)
    }
    // The drawing is the width asked, as the one-colour clean-up makes it.
    expect(Math.abs(d.colour.frame!.drawingWidthMm - 120)).toBeLessThan(2)
  }, 120_000)
})
