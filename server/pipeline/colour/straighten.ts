// The picture the colour layers are separated on: the same frame as the one-colour clean-up's
// (prepare.ts) — the sheet cut out and squared from its four corners (sheet.ts), turned by
// quarter turns and a fine angle (frame.ts) — read from the source through the same
// homography, so the layers line up with the straightened one-colour drawing. Without
// corners or a turn in the settings the frame is the source as it is, read as before.
import sharp from 'sharp'
import type { CleanUpChoice } from '../../../shared/types/pipeline'
import type { CornersSetting, PipelineSettings } from '../../../shared/utils/settings'
import { squaredSheet } from '../analyse'
import { PrepareError } from '../errors'
import { frameReadPlan, sourceFrame, turnFrame, type Frame, type Rect } from '../frame'
import { apply, invert, warpBilinear, type Pt } from '../homography'
import type { Quad } from '../sheet'

type FrameSettings = Pick<PipelineSettings, 'corners' | 'quarterTurns' | 'fineAngleDeg'>

/** Whether the settings straighten or turn the source (else the frame is the source as it is). */
export function straightens(settings: FrameSettings): boolean {
  return settings.corners.mode === 'manual' || settings.quarterTurns % 4 !== 0 || settings.fineAngleDeg !== 0
}

/**
 * The settings with the corners the one-colour clean-up found pinned (`choices` are its
 * choices for the same source), so the colour path straightens the photo exactly as it did;
 * the same settings (the same object) when it straightened nothing or they pin corners already.
 */
export function withCleanUpFrame<S extends { corners?: CornersSetting }>(settings: S, choices: CleanUpChoice[]): S {
  const found = choices.find((c) => c.setting === 'corners')
  if (!found || found.setting !== 'corners' || found.value.mode !== 'manual' || settings.corners?.mode === 'manual') return settings
  return { ...settings, corners: found.value }
}

/**
 * The frame the settings ask for on the upright source (cropped by `crop`), or null when it
 * is the source itself. Manual corners are points of the whole upright source, as the
 * clean-up reports the corners it found; the camera's principal point is the photo's centre.
 */
export function colourFrame(settings: FrameSettings, upright: { width: number, height: number }, crop: Rect | null): Frame | null {
  if (!straightens(settings)) return null
  const c = settings.corners
  const ox = crop?.left ?? 0, oy = crop?.top ?? 0
  const base = c.mode === 'manual'
    ? squaredSheet(c.points.map((p) => ({ x: p.x - ox, y: p.y - oy })) as Quad, { x: upright.width / 2 - ox, y: upright.height / 2 - oy }, Math.max(upright.width, upright.height))
    : sourceFrame(crop?.width ?? upright.width, crop?.height ?? upright.height)
  return turnFrame(base, settings.quarterTurns, settings.fineAngleDeg)
}

/** Where a point of the upright source (pixels) lies in the frame (pixels). */
export function sourceToFrame(frame: Frame, p: Pt, crop: Rect | null): Pt {
  return apply(invert(frame.toSource), { x: p.x - (crop?.left ?? 0), y: p.y - (crop?.top ?? 0) })
}

/** The middle value of each channel over the pixels whose alpha is full (sampled): the paper, on a drawing. */
function paperOf(rgba: Uint8Array, pixels: number): [number, number, number] {
  const step = Math.max(1, Math.floor(pixels / 50_000))
  const counts = [new Uint32Array(256), new Uint32Array(256), new Uint32Array(256)]
  let n = 0
  for (let i = 0; i < pixels; i += step) {
    if (rgba[i * 4 + 3] !== 255) continue
    for (let k = 0; k < 3; k++) counts[k]![rgba[i * 4 + k]!]!++
    n++
  }
  return counts.map((h) => {
    let seen = 0
    for (let v = 0; v < 256; v++) if ((seen += h[v]!) * 2 >= n) return v
    return 255
  }) as [number, number, number]
}

/**
 * R′G′B′ of a region of the frame (frame pixels) on a toW × toH grid. The source is resampled
 * by libvips close to that scale first (a proper filter when shrinking), then the frame is read
 * from it bilinearly through the homography, as the one-colour clean-up reads it. What the
 * frame holds beyond the sheet or the picture (the corners a fine turn uncovers) is paper: the
 * middle colour of the rest.
 */
export async function readFrame(input: Uint8Array, o: { maxSourcePixels: number, crop: Rect | null, width: number, height: number }, frame: Frame, region: Rect, toW: number, toH: number): Promise<Uint8Array> {
  const { source: s, nearW: iw, nearH: ih, outToIn, within } = frameReadPlan(frame, region, toW, toH, o.width, o.height)
  let near: Buffer
  try {
    near = await sharp(input, { limitInputPixels: o.maxSourcePixels, failOn: 'error' }).autoOrient()
      .extract({ left: s.left + (o.crop?.left ?? 0), top: s.top + (o.crop?.top ?? 0), width: s.width, height: s.height })
      .flatten({ background: '#ffffff' })
      .resize(iw, ih, { fit: 'fill', kernel: iw * ih < s.width * s.height ? 'lanczos3' : 'cubic' })
      .toColourspace('srgb').removeAlpha().ensureAlpha(1).raw({ depth: 'uchar' }).toBuffer()
  } catch (e) {
    throw new PrepareError('The image could not be decoded.', { cause: e })
  }
  if (near.length !== iw * ih * 4) throw new PrepareError(`Expected a ${iw} × ${ih} colour image, got ${near.length} bytes.`)
  const rgba = warpBilinear(new Uint8Array(near.buffer, near.byteOffset, near.length), iw, ih, 4, outToIn, toW, toH, [0, 0, 0, 0], within)
  const n = toW * toH
  const paper = paperOf(rgba, n)
  const rgb = new Uint8Array(n * 3)
  for (let i = 0; i < n; i++) {
    const a = rgba[i * 4 + 3]!
    for (let k = 0; k < 3; k++) {
      const v = rgba[i * 4 + k]!
      rgb[i * 3 + k] = a === 255 ? v : Math.round((v * a + paper[k]! * (255 - a)) / 255)
    }
  }
  return rgb
}
