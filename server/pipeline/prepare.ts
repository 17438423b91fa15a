// The prepared bitmap: from an uploaded source to a 1-bit ink/paper bitmap at the resolution
// the decal's target width asks for.
//
// Order: decode (first frame of an animation; transparency flattened onto white, except that a
// light drawing on a see-through background is read from its transparency) → turn upright by
// the orientation tag → crop →
// analysis of a shrunk copy (analyse.ts: straighten, lighting, lines, ink colour, dropout,
// threshold method; the drawing's extent) → the working grid: the frame (the source, or the
// straightened and turned sheet) at the prepared resolution → grey reading (luma, or density
// against the paper's colour with dropped colours read as paper) → lighting evening → threshold
// (Otsu, adaptive or manual) → swap ink and paper → paper lines taken out → trimmed to the
// drawing's ink plus the margin (prepareDrawing) or kept whole (prepareBitmap).
//
// The source is read by libvips twice, each time straight at the size needed (shrink-on-load
// for JPEG): once shrunk for the analysis, once at the working grid, so every per-pixel step
// runs at the prepared resolution, never the photo's (a small source, which either read would
// decode whole, is decoded once for both). Colour is resampled before grey (luma is linear in
// R′G′B′, so this equals resampling the grey image, up to rounding).
// Where the sheet is straightened or turned, the source is read near the working scale and the
// frame is taken from it by bilinear interpolation through the homography.
import sharp, { type Metadata, type OutputInfo, type Sharp } from 'sharp'
import type { CleanUpChoice } from '../../shared/types/pipeline'
import { preparedSize, type PreparedSize } from '../../shared/utils/units'
import { ANALYSIS_SIDE, applyThreshold, eveningTable, finishAnalysis, readingKey, readSheet, type Analysis, type SheetReading } from './analyse'
import { densityGrey } from './colour'
import { inkBox, piecesOf } from './components'
import { NotADrawingError, PrepareError } from './errors'
import { frameReadPlan, type Rect } from './frame'
import { multiply, scaleBilinear, scaleBilinearRows, scaling, translation, warpBilinear, type Mat3 } from './homography'
import { mapFamily, removeLines } from './lines'
import { luma, toGrey, type LumaStandard } from './luma'
import { histogram as makeHistogram } from './otsu'
import { bilevelPng } from './png'
import { thickenStrokes } from './thicken'
import { parseSettings, type PipelineSettings, type PipelineSettingsInput } from '../../shared/utils/settings'

export interface PrepareOptions {
  minPxPerMm?: number
  maxPxPerMm?: number
  maxUpscale?: number
  maxPixels?: number
  /** Largest source accepted, in pixels (decoded size). Default 100 million. */
  maxSourcePixels?: number
  /** Encode the PNG for speed rather than size (a preview that is shown once and dropped). */
  fastPng?: boolean
  /** Pieces under this area (mm², at the decal's size) are lost when weeding. Default 1. */
  smallPieceMm2?: number
  /**
   * The source's identity (its content hash): a run that gives one reuses the sheet's reading
   * (analyse.ts, readSheet) of an earlier run on the same source with the same clean-up
   * settings, as the tuning bench's previews do while the threshold or the outline changes.
   */
  sourceKey?: string
}

/** Sheet readings of recent runs that gave a sourceKey, newest last (a few MB each). */
const readings = new Map<string, SheetReading>()
const READINGS_KEPT = 4

function keepReading(key: string, reading: SheetReading): void {
  readings.delete(key)
  readings.set(key, reading)
  while (readings.size > READINGS_KEPT) readings.delete(readings.keys().next().value!)
}

export interface PrepareTimings {
  /** Reading the shrunk copy the analysis works on. */
  decodeMs: number
  /** The automatic clean-up's analysis of the shrunk copy (its steps in analysisSteps). */
  analysisMs: number
  analysisSteps: Analysis['timings']
  /** Reading the source at the working scale (and straightening it), and grey. */
  gridMs: number
  eveningMs: number
  thresholdMs: number
  /** Thin strokes thickened (thickenToMm). */
  thickenMs: number
  pngMs: number
  totalMs: number
}

export interface PreparedBitmap {
  /** 1 = ink, 0 = paper, row-major, width × height. */
  bitmap: Uint8Array
  width: number
  height: number
  pxPerMm: number
  widthMm: number
  heightMm: number
  /** Threshold used (ink = grey <= threshold); for the adaptive method, Otsu's level of the same grey. */
  threshold: number
  /** 256-bin histogram of the grey image the threshold was applied to. */
  histogram: Uint32Array
  /** The prepared bitmap as PNG: black ink on white paper, 2-colour palette. */
  png: Buffer
  /** Source size after orientation and crop, in source pixels. */
  source: { width: number, height: number, orientedWidth: number, orientedHeight: number }
  size: PreparedSize
  settings: PipelineSettings
  /** What the automatic clean-up chose (or the settings pinned), and why. */
  choices: CleanUpChoice[]
  timings: PrepareTimings
}

function asU8(b: Buffer): Uint8Array {
  return new Uint8Array(b.buffer, b.byteOffset, b.length)
}

/**
 * 1-bit ink/paper bitmap (1 = ink) as a black-on-white 2-colour PNG (png.ts). Previews ask for
 * the fastest compression; stored bitmaps for a smaller file (a few milliseconds more).
 */
export async function bitmapToPng(bitmap: Uint8Array, width: number, height: number, fast = false): Promise<Buffer> {
  return bilevelPng(bitmap, width, height, fast ? 1 : 6)
}

/** Reads the upright source (cropped by the settings) through sharp, as often as needed. */
interface SourceReader {
  /**
   * R′G′B′ (alpha flattened onto white) of a region of the upright, cropped source (whole
   * when null), resampled to toW × toH: Lanczos-3 when shrinking, cubic when enlarging. JPEG
   * sources are decoded at a reduced size when that is enough (libvips' shrink-on-load); a
   * full-size copy is held only of a source of up to DECODE_BESIDE_MAX_PIXELS (keepDecoded).
   */
  rgb(region: Rect | null, toW: number, toH: number): Promise<Uint8Array>
  /**
   * Luma of the same region at toW × toH. Enlarged, it is taken at the source's size and
   * enlarged in one channel (luma is linear in R′G′B′, as is cubic resampling: a third of the
   * work of enlarging three channels, within a level of it); shrunk, it is taken after.
   */
  grey(region: Rect | null, toW: number, toH: number, standard: LumaStandard): Promise<Uint8Array>
}

/** The upright source's transparency as a grey picture: opaque is ink (black), see-through is paper (white). */
interface ClearSource { grey: Buffer, width: number, height: number }

function sourceReader(input: Buffer | Uint8Array, maxSourcePixels: number, crop: Rect | null, width: number, height: number, keep: boolean, clear: ClearSource | null): SourceReader {
  const open = () => clear
    ? sharp(clear.grey, { raw: { width: clear.width, height: clear.height, channels: 1 } })
    : sharp(input, { limitInputPixels: maxSourcePixels, failOn: 'error' }).autoOrient()
  let whole: Promise<Uint8Array> | null = null
  const decoded = () => (whole ??= read((crop ? open().extract(crop) : open()).flatten({ background: '#ffffff' }), width, height))
  // Begun at once, so libvips decodes beside the analysis; a failure surfaces at the read that awaits it.
  if (keep) decoded().catch(() => {})
  return {
    async rgb(region, toW, toH) {
      const r = region ?? { left: 0, top: 0, width, height }
      const partial = r.width !== width || r.height !== height
      const resized = toW !== r.width || toH !== r.height
      const kernel = toW * toH < r.width * r.height ? 'lanczos3' : 'cubic'
      // The kept copy serves every read that libvips would not shrink while decoding (to half
      // the size or less), so each read sees the very pixels it would see from the file.
      if (keep && 2 * toW > r.width && 2 * toH > r.height) {
        const all = await decoded()
        if (!resized) return partial ? cropRgb(all, width, r) : all
        let img = sharp(all, { raw: { width, height, channels: 3 } })
        if (partial) img = img.extract(r)
        return read(img.resize(toW, toH, { fit: 'fill', kernel }), toW, toH)
      }
      let img = open()
      if (crop || partial) img = img.extract({ left: r.left + (crop?.left ?? 0), top: r.top + (crop?.top ?? 0), width: r.width, height: r.height })
      img = img.flatten({ background: '#ffffff' })
      if (resized) img = img.resize(toW, toH, { fit: 'fill', kernel })
      return read(img, toW, toH)
    },
    async grey(region, toW, toH, standard) {
      const r = region ?? { left: 0, top: 0, width, height }
      if (toW < r.width || toH < r.height || (toW === r.width && toH === r.height)) return toGrey(await this.rgb(region, toW, toH), toW, toH, 3, standard)
      const y = toGrey(await this.rgb(region, r.width, r.height), r.width, r.height, 3, standard)
      let out: { data: Buffer, info: OutputInfo }
      try {
        // b-w keeps one channel: sharp would otherwise answer a grey image as three.
        out = await sharp(y, { raw: { width: r.width, height: r.height, channels: 1 } }).resize(toW, toH, { fit: 'fill', kernel: 'cubic' })
          .toColourspace('b-w').raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
      } catch (e) {
        throw new PrepareError('The image could not be enlarged.', { cause: e })
      }
      if (out.info.channels !== 1 || out.info.width !== toW || out.info.height !== toH) {
        throw new PrepareError(`Expected a ${toW} × ${toH} grey image, got ${out.info.width} × ${out.info.height} × ${out.info.channels}.`)
      }
      return asU8(out.data)
    },
  }
}

/** A dark page: more than half the picture, and nine tenths of a band 2 % wide along its edges, is darker than this (R′G′B′ mean). */
export const DARK_PAGE_LEVEL = 100
export const NEGATIVE_HINT = 'Most of the picture is dark, right up to its edges: if the drawing is light on a dark background, swap ink and paper, or the decal is cut from the background around it.'

/**
 * Whether the frame (R′G′B′) is mostly dark, edges and all: light shapes on a dark page, which
 * read as their negative unless ink and paper are swapped. Said, not done: a filled plate with
 * cut-out letters, photographed close, reads the same way and is meant so.
 */
function darkPage(rgb: Uint8Array, w: number, h: number): boolean {
  const band = Math.max(1, Math.round(0.02 * Math.min(w, h)))
  let dark = 0, all = 0, edgeDark = 0, edge = 0
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const j = 3 * (y * w + x)
      const d = rgb[j]! + rgb[j + 1]! + rgb[j + 2]! < 3 * DARK_PAGE_LEVEL ? 1 : 0
      dark += d; all++
      if (x < band || y < band || x >= w - band || y >= h - band) { edgeDark += d; edge++ }
    }
  }
  return dark > 0.5 * all && edgeDark > 0.9 * edge
}

/** A see-through background: at least this share of the picture is more than half transparent. */
export const CLEAR_SHARE = 0.05
/** Light ink: half the opaque pixels are at least this luma, within an eighth of white (our rule of thumb). */
export const LIGHT_LUMA = 224

/**
 * Whether the source is a drawing in a light colour on a see-through background (a tablet
 * drawing exported for a dark page, say). Flattened onto white, as every other source is, it
 * would read as blank paper; its shapes are in its transparency instead. Read on a copy of at
 * most 256 pixels a side.
 */
async function lightOnClear(input: Buffer | Uint8Array, meta: Metadata, maxSourcePixels: number, standard: LumaStandard): Promise<ClearSource | null> {
  let out: { data: Buffer, info: OutputInfo }
  try {
    out = await sharp(input, { limitInputPixels: maxSourcePixels, failOn: 'error' }).resize(256, 256, { fit: 'inside', withoutEnlargement: true })
      .toColourspace('srgb').ensureAlpha().raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
  } catch (e) {
    throw new PrepareError('The image could not be decoded.', { cause: e })
  }
  const { data, info } = out
  if (info.channels !== 4 || !meta.channels) return null
  const n = info.width * info.height
  const hist = new Uint32Array(256)
  let opaque = 0
  for (let i = 0; i < data.length; i += 4) {
    if (data[i + 3]! < 128) continue
    hist[Math.round(luma(data[i]!, data[i + 1]!, data[i + 2]!, standard))]!++
    opaque++
  }
  if (n - opaque < CLEAR_SHARE * n || opaque === 0) return null
  let median = 0
  for (let acc = 0; median < 255; median++) if (2 * (acc += hist[median]!) >= opaque) break
  if (median < LIGHT_LUMA) return null
  try {
    const { data: grey, info: g } = await sharp(input, { limitInputPixels: maxSourcePixels, failOn: 'error' }).autoOrient()
      .extractChannel((meta.channels - 1) as 1 | 3).negate().raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
    return g.channels === 1 ? { grey, width: g.width, height: g.height } : null
  } catch (e) {
    throw new PrepareError('The image could not be decoded.', { cause: e })
  }
}

/** R′G′B′ of a sharp pipeline, checked to be toW × toH × 3. */
async function read(img: Sharp, toW: number, toH: number): Promise<Uint8Array> {
  let out: { data: Buffer, info: OutputInfo }
  try {
    out = await img.toColourspace('srgb').removeAlpha().raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
  } catch (e) {
    throw new PrepareError('The image could not be decoded.', { cause: e })
  }
  if (out.info.channels !== 3 || out.info.width !== toW || out.info.height !== toH) {
    throw new PrepareError(`Expected a ${toW} × ${toH} colour image, got ${out.info.width} × ${out.info.height} × ${out.info.channels}.`)
  }
  return asU8(out.data)
}

/** A region of an R′G′B′ image of the given width. */
function cropRgb(rgb: Uint8Array, width: number, r: Rect): Uint8Array {
  const out = new Uint8Array(r.width * r.height * 3)
  for (let y = 0; y < r.height; y++) out.set(rgb.subarray(((r.top + y) * width + r.left) * 3, ((r.top + y) * width + r.left + r.width) * 3), y * r.width * 3)
  return out
}

/** The bitmap cut to box (inclusive) with `margin` pixels of paper around it. */
function trimBitmap(bm: Uint8Array, width: number, box: { x0: number, y0: number, x1: number, y1: number }, margin: number): { bitmap: Uint8Array, width: number, height: number } {
  const w = box.x1 - box.x0 + 1 + 2 * margin
  const h = box.y1 - box.y0 + 1 + 2 * margin
  const out = new Uint8Array(w * h)
  for (let y = box.y0; y <= box.y1; y++) {
    out.set(bm.subarray(y * width + box.x0, y * width + box.x1 + 1), (y - box.y0 + margin) * w + margin)
  }
  return { bitmap: out, width: w, height: h }
}

/**
 * The bitmap with thin strokes thickened to `toMm` at the decal's size. For a drawing trimmed to
 * its ink (drawingWidthMm), the scale is known only after trimming, and thickening can widen the
 * ink by up to its own width plus a pixel: with B pixels of ink across now, the trimmed scale is
 * at most (B + 1 + w) / drawingWidthMm for a thickening of w pixels, so w = toMm · (B + 1) /
 * (drawingWidthMm − toMm) reaches toMm at any scale the trim can give; and one pixel is
 * added for the tracer.
 */
function thickenToWidth(bitmap: Uint8Array, width: number, height: number, toMm: number, pxPerMm: number, drawingWidthMm: number | null, speckFilterMm2: number): Uint8Array {
  const speck = Math.max(1, speckFilterMm2 * pxPerMm * pxPerMm)
  let px = toMm * pxPerMm
  if (drawingWidthMm !== null) {
    const box = inkBox(piecesOf(bitmap, width, height), speck)
    if (box) px = (toMm * (box.x1 - box.x0 + 2)) / Math.max(drawingWidthMm / 2, drawingWidthMm - toMm)
  }
  // One pixel more: the tracer's polygon lies within half a pixel of the bitmap's edges on each
  // side, so a stroke just at the width on the bitmap can come out a pixel narrower in the outline.
  return thickenStrokes(bitmap, width, height, px + 1, { speckAreaPx: speck })
}

const MIN_SIDE_PX = 8

/** Share of the ink that may sit in pieces under the speck filter (dust and grain) before the decal is refused: our rule of thumb. */
export const SPECK_INK_LIMIT = 0.05

const ALL_INK = 'Nearly the whole picture reads as ink, so there is no paper to cut the shapes from. If the drawing is light on a dark background, swap ink and paper; if the photo is dark, take it again in better light.'

/**
 * Refuse what cannot become a decal, saying plainly what is wrong and what to do. Facts come
 * from the analysis copy (analyse.ts); the limits were set on the hard-case set in the tests
 * (tests/unit/pipeline/hard-cases.test.ts). A photograph of a scene has no plain paper: what
 * reads as paper comes in many hues (sky, walls, faces), where a sheet of paper, however lit,
 * is one hue (spread at most 0.03 in the set, the scene 0.5), and much of it lies between
 * ink and paper or reads as ink.
 */
export function checkDrawing(a: Analysis, smallPieceMm2: number, speckFilterMm2: number): void {
  const f = a.facts
  // Barely two grey levels apart: noise split in two, not ink on paper.
  if (f.contrastLevels < 16 && f.meanGrey < 100) {
    throw new NotADrawingError('all-ink', ALL_INK)
  }
  if (!a.ink || f.contrastLevels < 16) {
    throw new NotADrawingError('blank', 'No drawing was found: the picture reads as blank paper. Check that it shows the drawing, in focus and in good light; a very faint pencil drawing can be gone over with a darker pen first.')
  }
  if (f.inkShare > 0.97) throw new NotADrawingError('all-ink', ALL_INK)
  if (f.paperHueSpread > 0.15 && (f.midShare > 0.03 || f.inkShare > 0.4)) {
    throw new NotADrawingError('scene', 'This looks like a photograph of a scene, not a drawing: there is no plain paper around clear ink (what would be paper comes in many colours). Draw the design on plain paper with a dark pen, and upload a photo or scan of that.')
  }
  // Dust and grain hold a sliver of the ink; more than that under the speck filter is the
  // drawing itself, shrunk so far that the decal would leave part of it out (and be trimmed to the rest).
  if (f.speckInkShare >= SPECK_INK_LIMIT) {
    // A threshold set by hand can break strokes into crumbs: then it is the thing to change.
    const remedy = a.threshold.mode === 'manual' ? 'Raise the threshold so the strokes hold together, make the decal larger, or lower the speck filter.' : 'Make the decal larger or lower the speck filter.'
    throw new NotADrawingError('specks', `At this size ${Math.round(f.speckInkShare * 100)} % of the drawing's ink is in pieces smaller than the speck filter (${speckFilterMm2} mm²), which the decal would leave out. ${remedy}`)
  }
  if (f.pieces >= 12 && f.smallPieces > 0.6 * f.pieces) {
    throw new NotADrawingError('specks', `Most of the ${f.pieces} pieces would be smaller than ${smallPieceMm2} mm² at this size and would be lost when weeding. Make the decal larger, raise the speck filter, or upload a cleaner drawing with bolder strokes.`)
  }
}

/**
 * The prepared bitmap of the whole frame (the source, or the straightened sheet), which is
 * `frameWidthMm` wide. Applies every clean-up setting except trimming to the drawing.
 */
export async function prepareBitmap(
  input: Buffer | Uint8Array,
  settingsInput: PipelineSettingsInput | PipelineSettings,
  frameWidthMm: number,
  options: PrepareOptions = {},
): Promise<PreparedBitmap> {
  return prepare(input, settingsInput, frameWidthMm, 'frame', options)
}

/**
 * The prepared bitmap of the drawing: trimmed to its ink, whose width is `drawingWidthMm`,
 * with the settings' margin of paper around it. Refuses (NotADrawingError) a source that
 * cannot become a decal.
 */
export async function prepareDrawing(
  input: Buffer | Uint8Array,
  settingsInput: PipelineSettingsInput | PipelineSettings,
  drawingWidthMm: number,
  options: PrepareOptions = {},
): Promise<PreparedBitmap> {
  return prepare(input, settingsInput, drawingWidthMm, 'drawing', options)
}

/**
 * Lighting evening of the working grid's grey, in place, with the paper's brightness (on the
 * analysis frame) enlarged a row at a time and used at once; returns the evened grey's histogram.
 */
function evenInPlace(grey: Uint8Array, w: number, h: number, paperMap: Uint8Array, mw: number, mh: number, toMap: Mat3, strength: number): Uint32Array {
  const table = eveningTable(strength)
  const hist = new Uint32Array(256)
  scaleBilinearRows(paperMap, mw, mh, toMap, w, h, (v, paper) => {
    for (let u = 0, i = v * w; u < w; u++, i++) {
      const e = table[(paper[u]! << 8) | grey[i]!]!
      grey[i] = e
      hist[e]!++
    }
  })
  return hist
}

/**
 * Sources up to this many pixels are decoded whole while the analysis runs (30 MB of R′G′B′).
 * Larger copies lie above glibc's largest mmap threshold (32 MiB on 64-bit, mallopt(3)), so
 * each is mapped afresh and faults on every page it writes, which on this machine cost about
 * 10 µs a page: a 12 MP copy (36 MB, some 9,000 faults) took longer than the analysis it ran
 * beside. Timed turn about in one process, 12 MP came out 8–16 % faster read after the
 * analysis instead, 8 and 10 MP alike either way, 4 MP faster decoded beside.
 */
export const DECODE_BESIDE_MAX_PIXELS = 10_000_000

/**
 * Whether the source is decoded whole once and kept for the reads that would decode it whole
 * anyway (see sourceReader), in plain 8-bit R′G′B′ (which a decode followed by the reads' own
 * steps leaves unchanged): a source under twice the analysis copy's side, whose analysis copy
 * is read from it; or one of up to DECODE_BESIDE_MAX_PIXELS, decoded on libvips' thread while
 * this one analyses the shrunk copy, for the working grid's read. Larger ones are not kept:
 * four 48 MP uploads at once must fit in memory.
 */
function keepDecoded(meta: Metadata, srcW: number, srcH: number): boolean {
  return (Math.max(srcW, srcH) < 2 * ANALYSIS_SIDE || srcW * srcH <= DECODE_BESIDE_MAX_PIXELS)
    && meta.channels === 3 && meta.depth === 'uchar' && !meta.hasProfile && (meta.space === undefined || meta.space === 'srgb')
}

async function prepare(
  input: Buffer | Uint8Array,
  settingsInput: PipelineSettingsInput | PipelineSettings,
  widthMm: number,
  widthOf: 'frame' | 'drawing',
  options: PrepareOptions,
): Promise<PreparedBitmap> {
  const settings = parseSettings(settingsInput)
  if (!(widthMm > 0) || !Number.isFinite(widthMm)) throw new RangeError('The target width must be a positive number of millimetres.')
  const t0 = performance.now()
  const maxSourcePixels = options.maxSourcePixels ?? 100_000_000

  let meta: Metadata
  try {
    meta = await sharp(input, { limitInputPixels: maxSourcePixels }).metadata()
  } catch (e) {
    throw new PrepareError('The file could not be read as an image (JPEG, PNG, WebP, TIFF, GIF or AVIF).', { cause: e })
  }
  const orientedWidth = meta.autoOrient?.width ?? meta.width
  const orientedHeight = meta.autoOrient?.height ?? meta.height
  if (!orientedWidth || !orientedHeight) throw new PrepareError('The image has no pixel size.')

  let srcW = orientedWidth
  let srcH = orientedHeight
  const crop = settings.crop
  if (crop) {
    if (crop.x + crop.width > orientedWidth || crop.y + crop.height > orientedHeight) {
      throw new PrepareError(
        `The crop rectangle (${crop.x}, ${crop.y}, ${crop.width} × ${crop.height}) lies outside the upright source of ${orientedWidth} × ${orientedHeight} pixels.`,
      )
    }
    srcW = crop.width
    srcH = crop.height
  }
  if (widthOf === 'drawing' && (srcW < MIN_SIDE_PX || srcH < MIN_SIDE_PX)) {
    throw new NotADrawingError('too-small', `The image is only ${srcW} × ${srcH} pixels: too small to hold a drawing. Upload a scan or photo of the drawing itself.`)
  }
  const clear = meta.hasAlpha ? await lightOnClear(input, meta, maxSourcePixels, settings.luma) : null
  const fromAlpha = clear !== null
  const source = sourceReader(input, maxSourcePixels, crop ? { left: crop.x, top: crop.y, width: crop.width, height: crop.height } : null, srcW, srcH,
    !fromAlpha && keepDecoded(meta, srcW, srcH), clear)

  // The analysis, on a shrunk copy; the sheet's reading kept from an earlier run when it can be.
  const aScale = Math.min(1, ANALYSIS_SIDE / Math.max(srcW, srcH))
  const aw = Math.max(1, Math.round(srcW * aScale)), ah = Math.max(1, Math.round(srcH * aScale))
  const key = options.sourceKey ? `${options.sourceKey} ${orientedWidth}×${orientedHeight} ${readingKey(settings)}` : null
  const kept = key ? readings.get(key) : undefined
  // A kept reading costs nothing this time: its steps' times are not counted again.
  let reading = kept && { ...kept, timings: { sheet: 0, frame: 0, paper: 0, lines: 0, colours: 0 } }
  if (key && kept) keepReading(key, kept)
  let t1 = performance.now()
  if (!reading) {
    const small = await source.rgb(null, aw, ah)
    t1 = performance.now()
    reading = await readSheet({
      rgb: small, width: aw, height: ah, scale: aw / srcW,
      sourceWidth: srcW, sourceHeight: srcH,
      principal: { x: orientedWidth / 2 - (crop?.x ?? 0), y: orientedHeight / 2 - (crop?.y ?? 0) },
      uprightWidth: orientedWidth, uprightHeight: orientedHeight,
      photoLongSide: Math.max(orientedWidth, orientedHeight),
      cropOffset: { x: crop?.x ?? 0, y: crop?.y ?? 0 },
      settings, widthOf, widthMm,
    })
    if (key) keepReading(key, reading)
  }
  const smallPieceMm2 = options.smallPieceMm2 ?? 1
  const analysis = finishAnalysis(reading, { settings, widthOf, widthMm, smallPieceMm2 })
  if (widthOf === 'drawing') checkDrawing(analysis, smallPieceMm2, settings.speckFilterMm2)
  const t2 = performance.now()

  // The working grid: a region of the frame (frame pixels) at `ws` working pixels per frame pixel.
  const frame = analysis.frame
  const limits = { minPxPerMm: options.minPxPerMm, maxPxPerMm: options.maxPxPerMm, maxUpscale: options.maxUpscale, maxPixels: options.maxPixels }
  let region: Rect
  let workW: number, workH: number, pxPerMmWork: number
  let size: PreparedSize
  if (widthOf === 'frame') {
    size = preparedSize({ sourceWidthPx: frame.width, sourceHeightPx: frame.height, targetWidthMm: widthMm, ...limits })
    region = { left: 0, top: 0, width: frame.width, height: frame.height }
    workW = size.widthPx; workH = size.heightPx; pxPerMmWork = size.pxPerMm
  } else {
    const ink = analysis.ink!
    const inkW = Math.max(1, ink.x1 - ink.x0), inkH = Math.max(1, ink.y1 - ink.y0)
    size = preparedSize({ sourceWidthPx: Math.max(1, Math.round(inkW)), sourceHeightPx: Math.max(1, Math.round(inkH)), targetWidthMm: widthMm, ...limits })
    const ws = size.widthPx / Math.max(1, Math.round(inkW))
    pxPerMmWork = size.pxPerMm
    // Room around the ink for the analysis' coarseness and the adaptive window.
    const windowFrame = analysis.threshold.mode === 'adaptive' ? (analysis.threshold.windowMm * pxPerMmWork) / ws / 2 : 0
    const pad = Math.max(6 / ws, 3 / analysis.scale, windowFrame, 0.01 * Math.max(frame.width, frame.height))
    const x0 = Math.max(0, Math.floor(ink.x0 - pad)), y0 = Math.max(0, Math.floor(ink.y0 - pad))
    const x1 = Math.min(frame.width, Math.ceil(ink.x1 + pad)), y1 = Math.min(frame.height, Math.ceil(ink.y1 + pad))
    region = { left: x0, top: y0, width: x1 - x0, height: y1 - y0 }
    workW = Math.max(1, Math.round(region.width * ws)); workH = Math.max(1, Math.round(region.height * ws))
  }
  // working pixel → frame pixel (continuous)
  const workToFrame = multiply(translation(region.left, region.top), scaling(region.width / workW, region.height / workH))

  let grey: Uint8Array
  let rgb: Uint8Array | null = null
  const density = analysis.reading === 'density'
  if (frame.identity) {
    if (density) rgb = await source.rgb(region, workW, workH)
    else grey = await source.grey(region, workW, workH, settings.luma)
  } else {
    // Resample the source close to the working scale first (libvips, with a proper filter),
    // then read the frame from it bilinearly.
    const { source: sRect, nearW: iw, nearH: ih, outToIn, within } = frameReadPlan(frame, region, workW, workH, srcW, srcH)
    const near = await source.rgb(sRect, iw, ih)
    const fill = analysis.paper.rgb.map(Math.round)
    // Luma is linear in R′G′B′: take it first and straighten one channel instead of three.
    if (density) rgb = warpBilinear(near, iw, ih, 3, outToIn, workW, workH, fill, within)
    else grey = warpBilinear(toGrey(near, iw, ih, 3, settings.luma), iw, ih, 1, outToIn, workW, workH, [Math.round(analysis.paper.luma)], within)
  }
  const t3 = performance.now()

  // Lighting evening and the grey reading, with the paper's brightness from the analysis.
  const n = workW * workH
  const evening = analysis.lighting.on ? analysis.lighting.strength : 0
  let paperLuma: Uint8Array | null = null
  const toAnalysis = multiply(scaling(analysis.width / frame.width, analysis.height / frame.height), workToFrame)
  let histogram: Uint32Array
  if (density) {
    if (evening > 0) paperLuma = scaleBilinear(analysis.paperMap, analysis.width, analysis.height, toAnalysis, workW, workH)
    grey = densityGrey(rgb!, n, { paper: analysis.paper, paperLuma, dropped: analysis.dropped, strength: evening })
    histogram = makeHistogram(grey)
  } else if (evening > 0) {
    histogram = evenInPlace(grey!, workW, workH, analysis.paperMap, analysis.width, analysis.height, toAnalysis, evening)
  } else {
    histogram = makeHistogram(grey!)
  }
  // Each full-size buffer is let go as soon as it is used: four 48 MP uploads at once must fit.
  rgb = null
  paperLuma = null
  const t4 = performance.now()

  const thresholded = applyThreshold(grey!, workW, workH, analysis.threshold, pxPerMmWork, histogram)
  const level = thresholded.level
  grey = new Uint8Array(0)
  let workBitmap = thresholded.bitmap
  if (settings.swapInkAndPaper) for (let i = 0; i < n; i++) workBitmap[i] = 1 - workBitmap[i]!
  if (analysis.removeLines) {
    const k = workW / region.width / analysis.scale
    for (const f of analysis.lines.filter((l) => !l.dropped)) {
      removeLines(workBitmap, workW, workH, mapFamily(f, k, -region.left * (workW / region.width), -region.top * (workH / region.height)))
    }
  }
  const t4b = performance.now()
  // Thickened after the paper lines are gone (they are thin too, and would otherwise grow).
  if (settings.thickenToMm !== null) {
    workBitmap = thickenToWidth(workBitmap, workW, workH, settings.thickenToMm, pxPerMmWork, widthOf === 'drawing' ? widthMm : null, settings.speckFilterMm2)
  }
  const t4c = performance.now()

  let bitmap = workBitmap, width = workW, height = workH, pxPerMm = pxPerMmWork
  const negative = !settings.swapInkAndPaper && darkPage(reading.rgb, reading.width, reading.height)
  const choices = analysis.choices.map((c) => {
    if (fromAlpha && c.setting === 'inkColour') return { ...c, reason: `The drawing is light on a see-through background, so its shapes are read from the transparency. ${c.reason}` }
    if (negative && c.setting === 'threshold') return { ...c, reason: `${c.reason} ${NEGATIVE_HINT}` }
    return c
  })
  const mm = (v: number) => v.toFixed(1)
  choices.push({
    setting: 'thickenToMm', automatic: false, value: settings.thickenToMm,
    reason: settings.thickenToMm === null
      ? 'Strokes are kept as drawn.'
      : `Strokes and dots narrower than ${Number(settings.thickenToMm.toFixed(2))} mm are thickened to that width, so they survive weeding.`,
  })
  if (widthOf === 'drawing') {
    const speck = Math.max(1, settings.speckFilterMm2 * pxPerMmWork * pxPerMmWork)
    const box = inkBox(piecesOf(workBitmap, workW, workH), speck)
    if (!box) {
      throw new NotADrawingError('blank', 'No drawing was found at this size: every piece of ink is smaller than the speck filter. Make the decal larger or lower the speck filter.')
    }
    pxPerMm = (box.x1 - box.x0 + 1) / widthMm
    const trimmed = trimBitmap(workBitmap, workW, box, Math.round(settings.marginMm * pxPerMm))
    bitmap = trimmed.bitmap; width = trimmed.width; height = trimmed.height
    choices.push({
      setting: 'marginMm', automatic: false, value: settings.marginMm,
      reason: `Trimmed to the drawing's ink, ${mm(widthMm)} × ${mm((box.y1 - box.y0 + 1) / pxPerMm)} mm, ${settings.marginMm > 0 ? `with ${mm(settings.marginMm)} mm of paper on every side` : 'with no margin'}.`,
    })
  }
  const t5 = performance.now()

  const png = await bitmapToPng(bitmap, width, height, options.fastPng)
  const t6 = performance.now()

  return {
    bitmap, width, height, pxPerMm,
    widthMm: widthOf === 'frame' ? widthMm : width / pxPerMm,
    heightMm: widthOf === 'frame' ? size.heightMm : height / pxPerMm,
    threshold: level, histogram, png,
    source: { width: srcW, height: srcH, orientedWidth, orientedHeight },
    size: widthOf === 'frame' ? size : { widthPx: width, heightPx: height, pxPerMm, heightMm: height / pxPerMm, capped: size.capped, scale: workW / region.width },
    settings,
    choices,
    timings: {
      decodeMs: t1 - t0, analysisMs: t2 - t1, analysisSteps: analysis.timings, gridMs: t3 - t2, eveningMs: t4 - t3,
      thresholdMs: t5 - t4 - (t4c - t4b), thickenMs: t4c - t4b, pngMs: t6 - t5, totalMs: t6 - t0,
    },
  }
}
