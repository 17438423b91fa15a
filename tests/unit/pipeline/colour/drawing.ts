// Coloured drawings made in code, with the true mask of every ink, and the same drawing as a
// phone would photograph it: light falling off across the sheet, a vignette, a tinted paper,
// a little lens blur, noise and JPEG.
import sharp from 'sharp'
import { gaussian, mulberry32 } from '../helpers'
import { finish, light, photograph as shoot, renderSheet, type Camera } from '../hard-cases'

export interface InkShape {
  /** The ink as drawn, sRGB hex. */
  hex: string
  /** SVG elements (no fill: the ink's colour is given to them). */
  body: string
}

export interface ColourDrawing {
  width: number
  height: number
  /** Inks in painting order: a later ink covers an earlier one where they overlap. */
  inks: InkShape[]
}

/** The drawing as SVG: white paper, then every ink in order. */
export function drawingSvg(d: ColourDrawing): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${d.width}" height="${d.height}" viewBox="0 0 ${d.width} ${d.height}">`
    + `<rect width="${d.width}" height="${d.height}" fill="#fff"/>`
    + d.inks.map((ink) => `<g fill="${ink.hex}" stroke="${ink.hex}">${ink.body}</g>`).join('')
    + '</svg>'
}

/**
 * The visible part of each ink as a 0/1 mask (an ink covered by a later one is not visible
 * there), rendered alone in black with every later ink in white over it, split at half cover.
 */
export async function trueMasks(d: ColourDrawing): Promise<Uint8Array[]> {
  const out: Uint8Array[] = []
  for (let k = 0; k < d.inks.length; k++) {
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${d.width}" height="${d.height}" viewBox="0 0 ${d.width} ${d.height}">`
      + `<rect width="${d.width}" height="${d.height}" fill="#fff"/>`
      + d.inks.map((ink, j) => (j < k ? '' : `<g fill="${j === k ? '#000' : '#fff'}" stroke="${j === k ? '#000' : '#fff'}">${ink.body}</g>`)).join('')
      + '</svg>'
    const { data, info } = await sharp(Buffer.from(svg)).greyscale().raw().toBuffer({ resolveWithObject: true })
    const mask = new Uint8Array(d.width * d.height)
    for (let i = 0; i < mask.length; i++) mask[i] = data[i * info.channels]! < 128 ? 1 : 0
    out.push(mask)
  }
  return out
}

export interface PhotoOptions {
  /** Paper tint, a factor per channel. */
  tint?: [number, number, number]
  /** Darkest light across the sheet, as a factor (1 = even light). */
  falloff?: number
  /** Light lost towards the corners, as a factor of the squared distance from the centre. */
  vignette?: number
  noise?: number
  blur?: number
  quality?: number
  seed?: number
}

/** The drawing photographed: raw RGB after a JPEG round trip, and the JPEG itself. */
export async function photograph(d: ColourDrawing, o: PhotoOptions = {}): Promise<{ rgb: Uint8Array, jpeg: Buffer }> {
  const { tint = [1, 0.96, 0.86], falloff = 0.55, vignette = 0.3, noise = 5, blur = 1, quality = 82, seed = 5 } = o
  const { width: W, height: H } = d
  const base = await sharp(Buffer.from(drawingSvg(d))).removeAlpha().blur(blur).raw().toBuffer()
  const rnd = mulberry32(seed)
  const out = Buffer.alloc(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const gradient = 1 - (1 - falloff) * (0.7 * x / W + 0.3 * y / H)
      const dx = (x - W * 0.4) / W, dy = (y - H * 0.4) / H
      const light = gradient * (1 - vignette * (dx * dx + dy * dy))
      const i = (y * W + x) * 3
      for (let c = 0; c < 3; c++) {
        const v = base[i + c]! * tint[c]! * light + noise * gaussian(rnd)
        out[i + c] = Math.max(0, Math.min(255, Math.round(v)))
      }
    }
  }
  const jpeg = await sharp(out, { raw: { width: W, height: H, channels: 3 } }).jpeg({ quality }).toBuffer()
  const rgb = await sharp(jpeg).raw().toBuffer()
  return { rgb: new Uint8Array(rgb.buffer, rgb.byteOffset, rgb.length), jpeg }
}

/** Three marker inks: a red disc, a blue block touching it (drawn over its edge), a yellow star on bare paper. */
export function threeInkDrawing(width = 1200, height = 900): ColourDrawing {
  const s = width / 1200
  const star: string[] = []
  for (let i = 0; i < 10; i++) {
    const r = (i % 2 ? 62 : 150) * s
    const t = -Math.PI / 2 + (i * Math.PI) / 5
    star.push(`${(960 * s + r * Math.cos(t)).toFixed(2)},${(300 * s + r * Math.sin(t)).toFixed(2)}`)
  }
  return {
    width, height,
    inks: [
      { hex: '#d8262e', body: `<circle cx="${380 * s}" cy="${470 * s}" r="${220 * s}"/>` },
      { hex: '#1d4fb8', body: `<rect x="${560 * s}" y="${330 * s}" width="${230 * s}" height="${420 * s}" stroke="none"/><path d="M${820 * s} ${600 * s} L${1120 * s} ${760 * s}" stroke-width="${34 * s}" fill="none"/>` },
      { hex: '#f7d417', body: `<polygon points="${star.join(' ')}" stroke="none"/>` },
    ],
  }
}

/** One black marker drawing: a ring, a bar and a stroke. */
export function blackDrawing(width = 1000, height = 750): ColourDrawing {
  const s = width / 1000
  const v = (x: number) => (x * s).toFixed(2)
  return {
    width, height,
    inks: [{
      hex: '#1c1b1f',
      body: `<circle cx="${v(300)}" cy="${v(370)}" r="${v(200)}" stroke="none"/><circle cx="${v(300)}" cy="${v(370)}" r="${v(90)}" fill="#fff" stroke="none"/>`
        + `<rect x="${v(560)}" y="${v(150)}" width="${v(90)}" height="${v(450)}" stroke="none"/><path d="M${v(700)} ${v(620)} Q${v(820)} ${v(300)} ${v(940)} ${v(600)}" stroke-width="${v(26)}" fill="none"/>`,
    }],
  }
}

export { gaussian, mulberry32 }

/** Where a drawing sits on the sheet photographed at an angle: its pixels are mmPerPx wide, its top-left corner at offsetMm. */
export interface OnSheet { widthMm: number, heightMm: number, offsetMm: [number, number], mmPerPx: number }

/**
 * The drawing on a sheet of paper photographed at an angle over a table: the sheet rendered
 * flat, then taken by a pinhole camera through a known homography (hard-cases.ts), with light
 * falling off, a little blur, noise and JPEG.
 */
export async function angledPhoto(d: ColourDrawing, camera: Camera): Promise<{ jpeg: Buffer, H: number[], sheet: OnSheet }> {
  const sheet: OnSheet = { widthMm: 200, heightMm: 150, offsetMm: [10, 7.5], mmPerPx: 180 / d.width }
  const inks = d.inks.map((ink) => `<g fill="${ink.hex}" stroke="${ink.hex}">${ink.body}</g>`).join('')
  const drawn = `<g transform="translate(${sheet.offsetMm[0]} ${sheet.offsetMm[1]}) scale(${sheet.mmPerPx})">${inks}</g>`
  const flat = await renderSheet({ widthMm: sheet.widthMm, heightMm: sheet.heightMm, paper: [244, 241, 232], drawing: drawn, ink: drawn }, 8)
  const shot = shoot(flat, 8, sheet.widthMm, sheet.heightMm, camera, (x, y) => { const k = 0.9 + 0.1 * Math.sin(x * 0.021 + y * 0.017); return [74 * k, 66 * k, 58 * k] })
  light(shot, (x, y) => 1 - 0.18 * x * y)
  return { jpeg: await finish(shot, { blur: 0.6, noise: 3, seed: 23, quality: 90 }), H: shot.H, sheet }
}

/**
 * Share of a layer's ink pixels wrong against the drawing's mask of its ink: each pixel of the
 * layer's prepared bitmap (black ink on white) against the drawing's pixel under its centre,
 * found through the straightened sheet: the bitmap is `trim` (fractions) of the sheet less its
 * inset edge, and the sheet holds the drawing as `sheet` says.
 */
export function wrongOnSheet(bitmap: { data: Uint8Array, width: number, height: number, channels: number }, mask: Uint8Array, d: ColourDrawing, trim: { x: number, y: number, width: number, height: number }, sheet: OnSheet, inset: number): number {
  let wrong = 0, ink = 0
  const toDrawing = (f: number, sideMm: number, offsetMm: number) => ((inset + f * (1 - 2 * inset)) * sideMm - offsetMm) / sheet.mmPerPx
  for (let y = 0; y < bitmap.height; y++) {
    const dy = Math.floor(toDrawing(trim.y + ((y + 0.5) / bitmap.height) * trim.height, sheet.heightMm, sheet.offsetMm[1]))
    for (let x = 0; x < bitmap.width; x++) {
      const dx = Math.floor(toDrawing(trim.x + ((x + 0.5) / bitmap.width) * trim.width, sheet.widthMm, sheet.offsetMm[0]))
      const truth = dx >= 0 && dy >= 0 && dx < d.width && dy < d.height ? mask[dy * d.width + dx]! : 0
      const cut = bitmap.data[(y * bitmap.width + x) * bitmap.channels]! < 128 ? 1 : 0
      if (truth) ink++
      if (cut !== truth) wrong++
    }
  }
  return wrong / Math.max(1, ink)
}
