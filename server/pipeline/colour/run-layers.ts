// A coloured drawing from its source to cut-ready layers (the steps; tasks.ts runs them):
// decode at the prepared resolution,
// separate the inks, outline each ink's mask, clean each outline, stack the layers (overlap or
// knock-out), frame them with registration marks, and measure each layer. Pure (no Nuxt, no
// storage), like run.ts, so a worker thread or a test can run it.
//
// A drawing of one ink (or none) is not separated: the answer says so ('single') and the
// caller runs the ordinary single-colour pipeline (run.ts) on the same request, so a
// one-colour drawing comes out exactly as it always has.
import sharp, { type Metadata } from 'sharp'
import type { EngineVersions } from '../../../shared/types/pipeline'
import type { LayerMeasurements } from '../../../shared/types/layers'
import { parseSettings, type PipelineSettings, type PipelineSettingsInput } from '../../../shared/utils/settings'
import { preparedSize } from '../../../shared/utils/units'
import { cleanVector } from '../clean'
import { PrepareError } from '../errors'
import { fidelity } from '../fidelity'
import { measureCurves, narrowestFeatureMm, smallPieces } from '../geometry'
import { round2 } from '../../cutsheet/path'
import { bitmapToPng, type PrepareOptions } from '../prepare'
import { DEFAULT_SMALL_PIECE_MM2, PREVIEW_OPTIONS } from '../run'
import { ENGINE_VERSIONS_BASE } from '../versions'
import { outlineToSvg, traceBitmap, type ClosedCurve, type Outline, type Point } from '../trace'
import type { Lab } from './lab'
import { DEFAULT_MARKS, marksCut, registrationFrame, withRegistrationMarks, type MarkSettings, type RegistrationFrame } from './marks'
import { stackedPreviewSvg } from './preview'
import { colourFrame, readFrame, sourceToFrame } from './straighten'
import type { Frame } from '../frame'
import { separateColours, type ColourPick, type FoundInk, type InkLayer, type PaperInfo, type Separation, type SeparationChoices } from './separate'
import { DEFAULT_STACK, layerVector, stackLayers, type StackSettings } from './stack'

/** Width of the seam between touching inks that the overlap fills, in prepared pixels (see stack.ts). */
export const SEAM_PX = 2

/** A preview finds the inks on a smaller copy: it answers while a control moves. */
export const PREVIEW_ANALYSIS_PIXELS = 200_000

/**
 * A colour picked on the source, as fractions of the upright source's width and height (the
 * radius as a fraction of its width), so a pick made on the bench's shrunk copy means the same
 * place in the full source.
 */
export interface SourcePick { x: number, y: number, radius?: number }

export type SourceChoices = Omit<SeparationChoices, 'picks'> & { picks?: SourcePick[] }

export interface ColourSettings {
  /** The designer's separation choices (automatic when empty). */
  choices: SourceChoices
  /** How lower layers meet the ones above: for all, or per layer bottom first. */
  stack: StackSettings | StackSettings[]
  marks: MarkSettings
}

export const DEFAULT_COLOUR_SETTINGS: ColourSettings = Object.freeze({ choices: {}, stack: DEFAULT_STACK, marks: DEFAULT_MARKS }) as ColourSettings

export interface LayeredRunRequest {
  source: Uint8Array
  /** The ordinary settings that apply to colour: crop, speck filter, corner rounding, curve tolerance. */
  settings: PipelineSettingsInput
  colour?: Partial<ColourSettings>
  widthMm: number
  purpose: 'revision' | 'preview'
  smallPieceMm2?: number
  /**
   * Trim to the drawing: a rectangle as fractions of the upright source, used when the
   * settings hold no crop of the designer's (an upload trims to the inks found on a first look).
   */
  trim?: { x: number, y: number, width: number, height: number }
}

export type { LayerMeasurements }

export interface LayerResult {
  name: string
  hex: string
  lab: Lab
  /** Indices of the found inks this layer is made of. */
  from: number[]
  /** Share of the picture's pixels. */
  share: number
  /** The ink's mask as a prepared bitmap PNG (black ink on white). */
  preparedPng: Uint8Array
  rawOutlineSvg: string
  /** The clean vector as traced, on the drawing's own canvas (before stacking and marks). */
  drawnSvg: string
  /** The clean vector as cut: stacked, on the framed canvas, with the marks. */
  cleanSvg: string
  /** Of the layer as cut (stacked, without the marks); fidelity and the narrowest stroke of the layer as traced. */
  measurements: LayerMeasurements
}

export interface SeparationSummary {
  sentence: string
  found: FoundInk[]
  paper: PaperInfo
}

export interface LayeredTimings {
  decodeMs: number
  separateMs: number
  traceMs: number
  cleanMs: number
  stackMs: number
  measureMs: number
  totalMs: number
}

export type LayeredRunResult =
  | { kind: 'single', separation: SeparationSummary, timings: LayeredTimings }
  | {
    kind: 'layers'
    separation: SeparationSummary
    /** Bottom first. */
    layers: LayerResult[]
    /** Every layer in its ink's colour, bottom first, on the framed canvas. */
    stackedSvg: string
    frame: RegistrationFrame
    pxPerMm: number
    timings: LayeredTimings
    engineVersions: EngineVersions
  }

/**
 * The picture the inks are separated on, resampled to the prepared size, as 8-bit sRGB: the
 * source upright and cropped, or, when the settings straighten or turn it (corners, quarter
 * turns, a fine angle), the same frame the one-colour clean-up reads (straighten.ts). A trim
 * is a rectangle of that picture, as fractions.
 */
export async function decodeColourSource(source: Uint8Array, settings: PipelineSettings, widthMm: number, options: PrepareOptions = {}, trim?: LayeredRunRequest['trim']) {
  const maxSourcePixels = options.maxSourcePixels ?? 100_000_000
  let meta: Metadata
  try {
    meta = await sharp(source, { limitInputPixels: maxSourcePixels }).metadata()
  } catch (e) {
    throw new PrepareError('The file could not be read as an image (JPEG, PNG, WebP, TIFF, GIF or AVIF).', { cause: e })
  }
  const orientedWidth = meta.autoOrient?.width ?? meta.width
  const orientedHeight = meta.autoOrient?.height ?? meta.height
  if (!orientedWidth || !orientedHeight) throw new PrepareError('The image has no pixel size.')
  const frame = colourFrame(settings, { width: orientedWidth, height: orientedHeight }, settings.crop ? { left: settings.crop.x, top: settings.crop.y, width: settings.crop.width, height: settings.crop.height } : null)
  if (frame) return decodeFrame(source, settings, widthMm, options, trim, frame, { width: orientedWidth, height: orientedHeight })
  let img = sharp(source, { limitInputPixels: maxSourcePixels, failOn: 'error' }).autoOrient()
  let srcW = orientedWidth, srcH = orientedHeight
  const crop = settings.crop ?? (trim ? trimPixels(trim, orientedWidth, orientedHeight) : null)
  if (crop) {
    if (crop.x + crop.width > orientedWidth || crop.y + crop.height > orientedHeight) {
      throw new PrepareError(`The crop rectangle (${crop.x}, ${crop.y}, ${crop.width} × ${crop.height}) lies outside the upright source of ${orientedWidth} × ${orientedHeight} pixels.`)
    }
    img = img.extract({ left: crop.x, top: crop.y, width: crop.width, height: crop.height })
    srcW = crop.width
    srcH = crop.height
  }
  const size = preparedSize({
    sourceWidthPx: srcW, sourceHeightPx: srcH, targetWidthMm: widthMm,
    minPxPerMm: options.minPxPerMm, maxPxPerMm: options.maxPxPerMm, maxUpscale: options.maxUpscale, maxPixels: options.maxPixels,
  })
  const shrinking = size.widthPx * size.heightPx < srcW * srcH
  try {
    const { data, info } = await img
      .resize(size.widthPx, size.heightPx, { fit: 'fill', kernel: shrinking ? 'lanczos3' : 'cubic' })
      .toColourspace('srgb').raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
    if (info.width !== size.widthPx || info.height !== size.heightPx || info.channels < 1 || info.channels > 4) {
      throw new PrepareError(`Decoded ${info.width} × ${info.height} × ${info.channels}, not the expected ${size.widthPx} × ${size.heightPx}.`)
    }
    // Where a point of the upright source (fractions of its size) lands in the decoded image.
    const fromSource = (p: SourcePick): ColourPick => ({
      x: Math.min(info.width - 1, Math.max(0, ((p.x * orientedWidth - (crop?.x ?? 0)) * info.width) / srcW)),
      y: Math.min(info.height - 1, Math.max(0, ((p.y * orientedHeight - (crop?.y ?? 0)) * info.height) / srcH)),
      radius: p.radius === undefined ? undefined : (p.radius * orientedWidth * info.width) / srcW,
    })
    return { data: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height, channels: info.channels as 1 | 2 | 3 | 4, size, fromSource }
  } catch (e) {
    if (e instanceof PrepareError) throw e
    throw new PrepareError('The image could not be decoded.', { cause: e })
  }
}

/** decodeColourSource for a straightened or turned frame: the trim is a rectangle of the frame. */
async function decodeFrame(source: Uint8Array, settings: PipelineSettings, widthMm: number, options: PrepareOptions, trim: LayeredRunRequest['trim'], frame: Frame, upright: { width: number, height: number }) {
  const crop = settings.crop ? { left: settings.crop.x, top: settings.crop.y, width: settings.crop.width, height: settings.crop.height } : null
  if (crop && (crop.left + crop.width > upright.width || crop.top + crop.height > upright.height)) {
    throw new PrepareError(`The crop rectangle (${crop.left}, ${crop.top}, ${crop.width} × ${crop.height}) lies outside the upright source of ${upright.width} × ${upright.height} pixels.`)
  }
  const t = trim ? trimPixels(trim, frame.width, frame.height) : { x: 0, y: 0, width: frame.width, height: frame.height }
  const region = { left: t.x, top: t.y, width: t.width, height: t.height }
  const size = preparedSize({
    sourceWidthPx: region.width, sourceHeightPx: region.height, targetWidthMm: widthMm,
    minPxPerMm: options.minPxPerMm, maxPxPerMm: options.maxPxPerMm, maxUpscale: options.maxUpscale, maxPixels: options.maxPixels,
  })
  const data = await readFrame(source, { maxSourcePixels: options.maxSourcePixels ?? 100_000_000, crop, width: crop?.width ?? upright.width, height: crop?.height ?? upright.height }, frame, region, size.widthPx, size.heightPx)
  const kx = size.widthPx / region.width, ky = size.heightPx / region.height
  // Where a point of the upright source (fractions of its size) lands in the decoded frame.
  const fromSource = (p: SourcePick): ColourPick => {
    const f = sourceToFrame(frame, { x: p.x * upright.width, y: p.y * upright.height }, crop)
    const edge = sourceToFrame(frame, { x: p.x * upright.width + (p.radius ?? 0) * upright.width, y: p.y * upright.height }, crop)
    return {
      x: Math.min(size.widthPx - 1, Math.max(0, (f.x - region.left) * kx)),
      y: Math.min(size.heightPx - 1, Math.max(0, (f.y - region.top) * ky)),
      radius: p.radius === undefined ? undefined : Math.hypot(edge.x - f.x, edge.y - f.y) * kx,
    }
  }
  return { data, width: size.widthPx, height: size.heightPx, channels: 3 as const, size, fromSource }
}

/** A trim rectangle (fractions) as whole pixels of the upright source, at least one pixel each way. */
export function trimPixels(t: NonNullable<LayeredRunRequest['trim']>, width: number, height: number) {
  if (![t.x, t.y, t.width, t.height].every((v) => v >= 0 && v <= 1) || t.width <= 0 || t.height <= 0) {
    throw new RangeError('A trim is given as fractions (0–1) of the source\'s width and height.')
  }
  const x = Math.min(width - 1, Math.floor(t.x * width)), y = Math.min(height - 1, Math.floor(t.y * height))
  return {
    x, y,
    width: Math.max(1, Math.min(width - x, Math.ceil((t.x + t.width) * width) - x)),
    height: Math.max(1, Math.min(height - y, Math.ceil((t.y + t.height) * height) - y)),
  }
}

/** The part of a bitmap holding its ink, with `margin` pixels of paper round it (clipped at the edges). */
export function inkWindow(bitmap: Uint8Array, width: number, height: number, margin = 2): { x0: number, y0: number, width: number, height: number, bitmap: Uint8Array } {
  let x0 = width, y0 = height, x1 = -1, y1 = -1
  for (let y = 0; y < height; y++) {
    const row = y * width
    let first = -1, last = -1
    for (let x = 0; x < width; x++) if (bitmap[row + x]) { if (first < 0) first = x; last = x }
    if (first < 0) continue
    if (y < y0) y0 = y
    y1 = y
    if (first < x0) x0 = first
    if (last > x1) x1 = last
  }
  if (x1 < 0) return { x0: 0, y0: 0, width, height, bitmap }
  x0 = Math.max(0, x0 - margin); y0 = Math.max(0, y0 - margin)
  x1 = Math.min(width - 1, x1 + margin); y1 = Math.min(height - 1, y1 + margin)
  const w = x1 - x0 + 1, h = y1 - y0 + 1
  const out = new Uint8Array(w * h)
  for (let y = 0; y < h; y++) out.set(bitmap.subarray((y0 + y) * width + x0, (y0 + y) * width + x0 + w), y * w)
  return { x0, y0, width: w, height: h, bitmap: out }
}

/**
 * Outline of one ink's mask, traced on the window holding its ink (the tracer and the narrowest
 * stroke both cost in proportion to the pixels they scan; a small ink on a big sheet is
 * cheap), then moved back to the whole bitmap's coordinates.
 */
function traceWindow(mask: Uint8Array, width: number, height: number, pxPerMm: number, settings: PipelineSettings): Outline {
  const win = inkWindow(mask, width, height)
  const o = traceBitmap({ bitmap: win.bitmap, width: win.width, height: win.height, pxPerMm }, settings)
  const p = (q: Point): Point => ({ x: q.x + win.x0, y: q.y + win.y0 })
  const curves: ClosedCurve[] = o.curves.map((c) => ({
    sign: c.sign,
    segments: c.segments.map((s) => s.kind === 'line'
      ? { kind: 'line', from: p(s.from), to: p(s.to) }
      : { kind: 'cubic', from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) }),
  }))
  return { ...o, curves, width, height }
}

/** The narrowest stroke of a layer rasterised back, measured on the window holding its ink. */
function narrowestInWindow(raster: Uint8Array, width: number, height: number, pxPerMm: number): number | null {
  const win = inkWindow(raster, width, height)
  return narrowestFeatureMm(win.bitmap, win.width, win.height, pxPerMm)
}

function summary(sep: Separation): SeparationSummary {
  return { sentence: sep.sentence, found: sep.found, paper: sep.paper }
}

// ---------------------------------------------------------------------------------------
// Three steps, each a unit of work a worker thread can take (their inputs and outputs are plain
// data and typed arrays): separate (one task), outline each ink (one task per ink, in
// parallel), assemble (one task). tasks.ts strings them together.
// ---------------------------------------------------------------------------------------

export interface SeparatedSource {
  separation: SeparationSummary
  inks: Array<Pick<InkLayer, 'name' | 'hex' | 'lab' | 'from' | 'share' | 'mask'>>
  width: number
  height: number
  pxPerMm: number
  timings: { decodeMs: number, separateMs: number }
}

/** Step 1: decode at the prepared resolution and separate the inks. */
export async function separateSource(req: LayeredRunRequest): Promise<SeparatedSource> {
  const t0 = performance.now()
  const settings = parseSettings(req.settings)
  const { picks, ...rest } = req.colour?.choices ?? DEFAULT_COLOUR_SETTINGS.choices
  const image = await decodeColourSource(req.source, settings, req.widthMm, req.purpose === 'preview' ? PREVIEW_OPTIONS : {}, req.trim)
  for (const p of picks ?? []) {
    if (!(p.x >= 0 && p.x <= 1 && p.y >= 0 && p.y <= 1) || (p.radius !== undefined && !(p.radius >= 0 && p.radius <= 1))) {
      throw new RangeError('A picked point is given as fractions (0–1) of the source\'s width and height.')
    }
  }
  const choices: SeparationChoices = { ...rest, picks: picks?.map(image.fromSource) }
  const t1 = performance.now()
  // Always relative to the paper under the ink: on an evenly lit scan the paper estimate is
  // flat and dividing by it changes nothing; on a photo it is what tells shading from ink.
  const sep = await separateColours(image, choices, { analysisPixels: req.purpose === 'preview' ? PREVIEW_ANALYSIS_PIXELS : undefined })
  const t2 = performance.now()
  return {
    separation: summary(sep),
    inks: sep.inks.map(({ name, hex, lab, from, share, mask }) => ({ name, hex, lab, from, share, mask })),
    width: image.width, height: image.height, pxPerMm: image.size.pxPerMm,
    timings: { decodeMs: t1 - t0, separateMs: t2 - t1 },
  }
}

export interface OutlinedInk {
  rawOutlineSvg: string
  /** The clean vector as traced, on the drawing's own canvas. */
  drawnSvg: string
  curvesMm: ClosedCurve[]
  fidelity: number
  narrowestFeatureMm: number | null
  preparedPng: Uint8Array
  timings: { traceMs: number, cleanMs: number, measureMs: number }
}

/** Step 2, for each ink: outline its mask, clean it, and measure what needs the bitmap. */
export async function outlineInk(mask: Uint8Array, width: number, height: number, pxPerMm: number, settingsInput: PipelineSettingsInput, purpose: LayeredRunRequest['purpose']): Promise<OutlinedInk> {
  const settings = parseSettings(settingsInput)
  // Sharp's work (the PNG, the clean vector rasterised back) runs on its own threads: started
  // as soon as its input exists, it overlaps the outlining done here.
  const png = bitmapToPng(mask, width, height, purpose === 'preview')
  const t0 = performance.now()
  const outline = traceWindow(mask, width, height, pxPerMm, settings)
  const t1 = performance.now()
  const clean = cleanVector(outline)
  const t2 = performance.now()
  const fid = await fidelity(clean.svg, { bitmap: mask, width, height })
  const narrowest = narrowestInWindow(fid.raster, width, height, pxPerMm)
  const pngBytes = await png
  return {
    rawOutlineSvg: outlineToSvg(outline), drawnSvg: clean.svg, curvesMm: clean.curvesMm,
    fidelity: fid.iou, narrowestFeatureMm: narrowest,
    preparedPng: new Uint8Array(pngBytes.buffer, pngBytes.byteOffset, pngBytes.byteLength),
    timings: { traceMs: t1 - t0, cleanMs: t2 - t1, measureMs: performance.now() - t2 },
  }
}

export interface AssembledLayers {
  layers: LayerResult[]
  stackedSvg: string
  frame: RegistrationFrame
  stackMs: number
  engineVersions: EngineVersions
}

/** Step 3: stack the outlined inks, frame them with the marks, and measure each layer as cut. */
export function assembleLayers(sep: SeparatedSource, outlined: OutlinedInk[], colourInput: Partial<ColourSettings> = {}, smallPieceMm2 = DEFAULT_SMALL_PIECE_MM2): AssembledLayers {
  const t0 = performance.now()
  const colour = { ...DEFAULT_COLOUR_SETTINGS, ...colourInput }
  const { width, height, pxPerMm } = sep
  const canvas = { widthMm: width / pxPerMm, heightMm: height / pxPerMm }
  // The seam between touching inks, each outlined alone: two prepared pixels.
  const stacked = stackLayers(outlined.map((o) => ({ curves: o.curvesMm })), canvas, colour.stack, { seamMm: SEAM_PX / pxPerMm })
  const frame = registrationFrame(stacked, canvas, colour.marks)
  const framed = stacked.map((l) => layerVector(withRegistrationMarks(l.curves, frame), frame))
  // The marks are cut beside every layer (none when they are off).
  const marks = marksCut(frame)
  const layers: LayerResult[] = outlined.map((o, i) => {
    const ink = sep.inks[i]!
    const cut = stacked[i]!
    const geometry = measureCurves(cut.curves, 1)
    return {
      name: ink.name, hex: ink.hex, lab: ink.lab, from: ink.from, share: ink.share,
      preparedPng: o.preparedPng, rawOutlineSvg: o.rawOutlineSvg, drawnSvg: o.drawnSvg, cleanSvg: framed[i]!.svg,
      measurements: {
        widthMm: round2(canvas.widthMm), heightMm: round2(canvas.heightMm),
        inkAreaMm2: geometry.inkAreaMm2, cutLengthMm: geometry.cutLengthMm,
        pieces: geometry.pieces, holes: geometry.holes, nodes: geometry.nodeCount,
        narrowestFeatureMm: o.narrowestFeatureMm,
        smallPieces: smallPieces(cut.curves, 1, smallPieceMm2).length, smallPieceLimitMm2: smallPieceMm2,
        fidelity: o.fidelity, pxPerMm, preparedWidthPx: width, preparedHeightPx: height,
        marks,
      },
    }
  })
  const stackedSvg = stackedPreviewSvg(framed.map((f, i) => ({ svg: f.svg, hex: layers[i]!.hex })))
  const engineVersions = { ...ENGINE_VERSIONS_BASE, sharp: sharp.versions.sharp ?? '', vips: sharp.versions.vips }
  return { layers, stackedSvg, frame, stackMs: performance.now() - t0, engineVersions }
}
