// The hard-case set: sources as students hand them in, made in code, each with the clean
// drawing it was made from. Sheets are drawn as SVG in millimetres, then photographed in code:
// paper tint and lines, the drawing in its medium (marker, pen, faint pencil), light that
// falls off and shadows, a camera at an angle over a table (a pinhole camera whose principal
// point is the picture's centre), lens blur, sensor noise, JPEG.
import sharp from 'sharp'
import { gaussian, mulberry32 } from './helpers'

export type Rgb = [number, number, number]

/** A 3 × 3 matrix, row-major. */
export type M3 = number[]

export interface Sheet {
  widthMm: number
  heightMm: number
  paper: Rgb
  /** SVG elements of the paper's printed lines (mm). */
  lines?: string
  /** SVG elements of the drawing as drawn (mm, in its colours). */
  drawing: string
  /** The same drawing in black: the clean drawing. */
  ink: string
}

export interface HardCase {
  name: string
  /** The photo or scan as uploaded. */
  source: Buffer
  /** The clean drawing (black SVG elements in mm on the sheet) and the sheet's size. */
  sheet: Sheet
  /** The decal's width: the drawing's own width on the sheet (1:1). */
  widthMm: number
  /** Expected refusal, when the case is not a drawing. */
  refuse?: string
}

const svg = (w: number, h: number, vw: number, vh: number, body: string, bg?: string) =>
  `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}" viewBox="0 0 ${vw} ${vh}" preserveAspectRatio="none">${bg ? `<rect x="-1" y="-1" width="${vw + 2}" height="${vh + 2}" fill="${bg}"/>` : ''}${body}</svg>`

const hex = (c: Rgb) => '#' + c.map((v) => Math.round(v).toString(16).padStart(2, '0')).join('')

/** The sheet rendered at pxPerMm: R′G′B′, 3 bytes a pixel. */
export async function renderSheet(s: Sheet, pxPerMm: number): Promise<{ rgb: Float32Array, width: number, height: number }> {
  const w = Math.round(s.widthMm * pxPerMm), h = Math.round(s.heightMm * pxPerMm)
  const doc = svg(w, h, s.widthMm, s.heightMm, (s.lines ?? '') + s.drawing, hex(s.paper))
  const { data } = await sharp(Buffer.from(doc)).flatten({ background: hex(s.paper) }).removeAlpha().raw().toBuffer({ resolveWithObject: true })
  return { rgb: Float32Array.from(data), width: w, height: h }
}

/**
 * Ink pixels (1) of the clean drawing (black on white; white shapes are holes) on a grid of
 * w × h pixels covering the mm box (x, y, bw, bh): a pixel is ink when it is at least half
 * covered.
 */
export async function cleanMask(s: Sheet, box: { x: number, y: number, w: number, h: number }, w: number, h: number): Promise<Uint8Array> {
  const doc = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}" viewBox="${box.x} ${box.y} ${box.w} ${box.h}" preserveAspectRatio="none">${s.ink}</svg>`
  const { data, info } = await sharp(Buffer.from(doc)).flatten({ background: '#ffffff' }).raw().toBuffer({ resolveWithObject: true })
  const out = new Uint8Array(w * h)
  for (let i = 0; i < out.length; i++) out[i] = data[i * info.channels]! < 128 ? 1 : 0
  return out
}

/**
 * The clean drawing's ink box on the sheet, mm: found at 10 px/mm, then each side placed to
 * 0.01 mm on a band around it rendered at 100 px/mm (a pixel counts as ink when at least half
 * of it is covered, as in cleanMask).
 */
export async function inkBoxMm(s: Sheet): Promise<{ x: number, y: number, w: number, h: number }> {
  const extent = async (box: { x: number, y: number, w: number, h: number }, k: number) => {
    const w = Math.max(1, Math.round(box.w * k)), h = Math.max(1, Math.round(box.h * k))
    const m = await cleanMask(s, box, w, h)
    let x0 = w, y0 = h, x1 = -1, y1 = -1
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) if (m[y * w + x]) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y) }
    return { x0: box.x + x0 / k, y0: box.y + y0 / k, x1: box.x + (x1 + 1) / k, y1: box.y + (y1 + 1) / k }
  }
  const c = await extent({ x: 0, y: 0, w: s.widthMm, h: s.heightMm }, 10)
  const fine = 100, m = 0.15
  const left = (await extent({ x: c.x0 - m, y: c.y0 - m, w: 2 * m, h: c.y1 - c.y0 + 2 * m }, fine)).x0
  const right = (await extent({ x: c.x1 - m, y: c.y0 - m, w: 2 * m, h: c.y1 - c.y0 + 2 * m }, fine)).x1
  const top = (await extent({ x: c.x0 - m, y: c.y0 - m, w: c.x1 - c.x0 + 2 * m, h: 2 * m }, fine)).y0
  const bottom = (await extent({ x: c.x0 - m, y: c.y1 - m, w: c.x1 - c.x0 + 2 * m, h: 2 * m }, fine)).y1
  // The sheet's own edges cut the drawing off.
  const x0 = Math.max(0, left), y0 = Math.max(0, top), x1 = Math.min(s.widthMm, right), y1 = Math.min(s.heightMm, bottom)
  return { x: x0, y: y0, w: x1 - x0, h: y1 - y0 }
}

/** Multiply every pixel by light(x, y) (x, y in 0…1 across the picture). */
export function light(img: { rgb: Float32Array, width: number, height: number }, f: (x: number, y: number) => number): void {
  const { rgb, width, height } = img
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) {
    const k = f(x / width, y / height)
    const i = (y * width + x) * 3
    rgb[i]! *= k; rgb[i + 1]! *= k; rgb[i + 2]! *= k
  }
}

export async function finish(img: { rgb: Float32Array, width: number, height: number }, o: { blur?: number, noise?: number, seed?: number, quality?: number, png?: boolean } = {}): Promise<Buffer> {
  const { width, height } = img
  const rnd = mulberry32(o.seed ?? 1)
  const bytes = Buffer.alloc(width * height * 3)
  for (let i = 0; i < bytes.length; i++) bytes[i] = Math.max(0, Math.min(255, Math.round(img.rgb[i]! + (o.noise ?? 0) * gaussian(rnd))))
  let s = sharp(bytes, { raw: { width, height, channels: 3 } })
  if (o.blur) s = s.blur(o.blur)
  return o.png ? s.png().toBuffer() : s.jpeg({ quality: o.quality ?? 88 }).toBuffer()
}

function inv3(m: M3): M3 {
  const [a, b, c, d, e, f, g, h, i] = m as [number, number, number, number, number, number, number, number, number]
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g
  const det = a * A + b * B + c * C
  return [A / det, -(b * i - c * h) / det, (b * f - c * e) / det, B / det, (a * i - c * g) / det, -(a * f - c * d) / det, C / det, -(a * h - b * g) / det, (a * e - b * d) / det]
}

export interface Camera {
  width: number
  height: number
  /** Focal length, px. */
  focal: number
  /** Turns of the sheet's plane (degrees): about the picture's x axis (tilt), y axis, then in-plane. */
  tiltDeg: number
  yawDeg: number
  rollDeg: number
  /** Distance from the camera to the sheet's centre, mm. */
  distanceMm: number
  /** Where the sheet's centre appears, as a shift of the optical axis (mm on the plane). */
  shiftMm?: [number, number]
}

/**
 * The homography taking a point of the sheet (mm, origin at its top-left corner) to the
 * photo (px): H = K [r1 r2 t] for a pinhole camera (K with the principal point at the
 * picture's centre), the plane turned by R and placed at distance d.
 */
export function cameraHomography(c: Camera, sheetW: number, sheetH: number): M3 {
  const rad = (d: number) => (d * Math.PI) / 180
  const Rx = (t: number): M3 => [1, 0, 0, 0, Math.cos(t), -Math.sin(t), 0, Math.sin(t), Math.cos(t)]
  const Ry = (t: number): M3 => [Math.cos(t), 0, Math.sin(t), 0, 1, 0, -Math.sin(t), 0, Math.cos(t)]
  const Rz = (t: number): M3 => [Math.cos(t), -Math.sin(t), 0, Math.sin(t), Math.cos(t), 0, 0, 0, 1]
  const mul = (a: M3, b: M3): M3 => [0, 1, 2].flatMap((i) => [0, 1, 2].map((j) => a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!))
  const R = mul(Rx(rad(c.tiltDeg)), mul(Ry(rad(c.yawDeg)), Rz(rad(c.rollDeg))))
  const [sx, sy] = c.shiftMm ?? [0, 0]
  // plane point (u, v) in mm → camera coordinates R·(u − W/2 + sx, v − H/2 + sy, 0) + (0, 0, d)
  const cols = [
    [R[0]!, R[3]!, R[6]!],
    [R[1]!, R[4]!, R[7]!],
  ]
  const t = [0, 1, 2].map((k) => cols[0]![k]! * (-sheetW / 2 + sx) + cols[1]![k]! * (-sheetH / 2 + sy) + (k === 2 ? c.distanceMm : 0))
  const P: M3 = [cols[0]![0]!, cols[1]![0]!, t[0]!, cols[0]![1]!, cols[1]![1]!, t[1]!, cols[0]![2]!, cols[1]![2]!, t[2]!]
  const K: M3 = [c.focal, 0, c.width / 2, 0, c.focal, c.height / 2, 0, 0, 1]
  return mul(K, P)
}

export function project(H: M3, x: number, y: number): [number, number] {
  const w = H[6]! * x + H[7]! * y + H[8]!
  return [(H[0]! * x + H[1]! * y + H[2]!) / w, (H[3]! * x + H[4]! * y + H[5]!) / w]
}

/**
 * Photograph a rendered sheet with camera `c` over a background: every photo pixel is traced
 * back to the sheet (4 samples per pixel, bilinear on the sheet's pixels).
 */
export function photograph(sheet: { rgb: Float32Array, width: number, height: number }, pxPerMm: number, wMm: number, hMm: number, c: Camera, background: (x: number, y: number) => Rgb): { rgb: Float32Array, width: number, height: number, H: M3 } {
  const H = cameraHomography(c, wMm, hMm)
  const Hi = inv3(H)
  const out = new Float32Array(c.width * c.height * 3)
  const { rgb, width: sw, height: sh } = sheet
  const at = (x: number, y: number, k: number) => rgb[(y * sw + x) * 3 + k]!
  for (let py = 0; py < c.height; py++) {
    for (let px = 0; px < c.width; px++) {
      const acc = [0, 0, 0]
      for (const [ox, oy] of [[0.25, 0.25], [0.75, 0.25], [0.25, 0.75], [0.75, 0.75]] as const) {
        const [u, v] = project(Hi, px + ox, py + oy)
        const x = u * pxPerMm - 0.5, y = v * pxPerMm - 0.5
        if (u < 0 || v < 0 || u >= wMm || v >= hMm) {
          const b = background(px, py)
          acc[0]! += b[0]; acc[1]! += b[1]; acc[2]! += b[2]
          continue
        }
        const x0 = Math.max(0, Math.min(sw - 2, Math.floor(x))), y0 = Math.max(0, Math.min(sh - 2, Math.floor(y)))
        const fx = Math.max(0, Math.min(1, x - x0)), fy = Math.max(0, Math.min(1, y - y0))
        for (let k = 0; k < 3; k++) {
          acc[k]! += (at(x0, y0, k) * (1 - fx) + at(x0 + 1, y0, k) * fx) * (1 - fy) + (at(x0, y0 + 1, k) * (1 - fx) + at(x0 + 1, y0 + 1, k) * fx) * fy
        }
      }
      const o = (py * c.width + px) * 3
      out[o] = acc[0]! / 4; out[o + 1] = acc[1]! / 4; out[o + 2] = acc[2]! / 4
    }
  }
  return { rgb: out, width: c.width, height: c.height, H }
}

// ---------- drawings ----------

/** A team badge: a gear ring with teeth, a bolt, a bar and the digits "47" as strokes (mm). */
function badge(x: number, y: number, colour: string, filled = true, stroke = 3): string {
  const teeth = Array.from({ length: 10 }, (_, i) => `<rect x="-2.5" y="-27" width="5" height="7" transform="rotate(${i * 36})"/>`).join('')
  return `<g transform="translate(${x} ${y})" fill="${colour}" stroke-linecap="round" stroke-linejoin="round">
    <g transform="translate(26 28)">${teeth}<circle r="21" fill="none" stroke="${colour}" stroke-width="5"/>${filled ? '<circle r="7"/>' : ''}</g>
    <path d="M66 2 L56 30 L66 30 L58 56 L80 22 L69 22 L76 2 Z"/>
    <rect x="4" y="62" width="86" height="${filled ? 7 : stroke}"/>
    <path d="M92 10 L92 42 M92 10 L80 32 L100 32 M106 10 L122 10 L110 44" fill="none" stroke="${colour}" stroke-width="${stroke}"/>
  </g>`
}

/**
 * The same badge drawn in strokes only, as a pencil sketch (mm). `opacity` sets how dark the
 * strokes are; with `pressure`, strokes vary from that to half as dark again (a hand presses
 * unevenly).
 */
function sketch(x: number, y: number, colour: string, stroke: number, opacity: number, pressure = false): string {
  const o = (k: number) => (pressure ? opacity * (0.75 + 0.25 * k) : opacity).toFixed(3)
  return `<g transform="translate(${x} ${y})" fill="none" stroke="${colour}" stroke-width="${stroke}" stroke-linecap="round" stroke-linejoin="round">
    <circle cx="30" cy="30" r="22" stroke-opacity="${o(1)}"/><circle cx="30" cy="30" r="9" stroke-opacity="${o(0.4)}"/>
    <path d="M30 2 L30 58 M2 30 L58 30 M10 10 L50 50 M50 10 L10 50" stroke-opacity="${o(0.7)}"/>
    <path d="M70 4 L60 32 L70 32 L62 58 L86 24 L74 24 L82 4 Z" stroke-opacity="${o(0)}"/>
    <path d="M96 12 C 110 0, 126 16, 112 28 C 100 40, 122 50, 128 56" stroke-opacity="${o(0.5)}"/>
    <rect x="6" y="66" width="118" height="12" rx="4" stroke-opacity="${o(0.9)}"/>
  </g>`
}

function gridLines(wMm: number, hMm: number, spacing: number, colour: string, width: number): string {
  let d = ''
  for (let x = spacing / 2; x < wMm; x += spacing) d += `M${x.toFixed(2)} 0V${hMm}`
  for (let y = spacing / 2; y < hMm; y += spacing) d += `M0 ${y.toFixed(2)}H${wMm}`
  return `<path d="${d}" stroke="${colour}" stroke-width="${width}" fill="none"/>`
}

function ruledLines(wMm: number, hMm: number, spacing: number, colour: string, width: number, marginX: number, marginColour: string): string {
  let d = ''
  for (let y = 24; y < hMm - 6; y += spacing) d += `M0 ${y.toFixed(2)}H${wMm}`
  return `<path d="${d}" stroke="${colour}" stroke-width="${width}" fill="none"/><path d="M${marginX} 0V${hMm}" stroke="${marginColour}" stroke-width="${width * 1.5}"/>`
}

const A5 = { widthMm: 148, heightMm: 210 }
/** Sheet pixels per mm for the flat (scanned) cases. */
const SCAN = 6

async function flat(name: string, sheet: Sheet, o: { light?: (x: number, y: number) => number, blur?: number, noise?: number, seed?: number, quality?: number, png?: boolean }): Promise<HardCase> {
  const img = await renderSheet(sheet, SCAN)
  if (o.light) light(img, o.light)
  const source = await finish(img, o)
  const box = await inkBoxMm(sheet)
  return { name, source, sheet, widthMm: box.w }
}

export async function unevenLight(): Promise<HardCase> {
  const drawing = badge(14, 60, '#1b1a1f')
  return flat('uneven light', { ...A5, paper: [244, 241, 232], drawing, ink: badge(14, 60, '#000') }, {
    // light falls off to the bottom right, with a vignette
    light: (x, y) => (1 - 0.55 * (0.6 * x + 0.4 * y)) * (1 - 0.25 * ((x - 0.5) ** 2 + (y - 0.5) ** 2) * 4),
    blur: 0.8, noise: 4, seed: 11,
  })
}

export async function gridBlue(): Promise<HardCase> {
  const lines = gridLines(A5.widthMm, A5.heightMm, 5, '#7fb2e6', 0.25)
  return flat('pencil on blue grid paper', { ...A5, paper: [248, 248, 245], lines, drawing: sketch(10, 60, '#2a2a2a', 1.2, 0.8), ink: sketch(10, 60, '#000', 1.2, 1) }, {
    light: (x, y) => 1 - 0.12 * y, blur: 0.7, noise: 3, seed: 12,
  })
}

export async function gridGrey(): Promise<HardCase> {
  const lines = gridLines(A5.widthMm, A5.heightMm, 5, '#9a9a9a', 0.2)
  return flat('pen on grey grid paper', { ...A5, paper: [250, 250, 248], lines, drawing: badge(14, 60, '#202020', false, 2.2), ink: badge(14, 60, '#000', false, 2.2) }, {
    light: (x) => 1 - 0.08 * x, blur: 0.6, noise: 3, seed: 13,
  })
}

export async function ruled(): Promise<HardCase> {
  const lines = ruledLines(A5.widthMm, A5.heightMm, 8, '#8fb3dc', 0.3, 20, '#e07a7a')
  return flat('pen on ruled paper', { ...A5, paper: [250, 249, 244], lines, drawing: badge(14, 60, '#1c2230', false, 2.2), ink: badge(14, 60, '#000', false, 2.2) }, {
    blur: 0.6, noise: 3, seed: 14,
  })
}

export async function pencil(): Promise<HardCase> {
  // Faint and thin: soft grey at a third of the paper's darkness, 1.2 mm strokes (about the
  // thinnest a decal cut at 1:1 keeps through weeding), light falling off.
  return flat('faint pencil', { ...A5, paper: [246, 245, 240], drawing: sketch(10, 60, '#404040', 1.2, 0.45), ink: sketch(10, 60, '#000', 1.2, 1) }, {
    light: (x, y) => 1 - 0.18 * x * y, blur: 0.9, noise: 3, seed: 15,
  })
}

export async function marker(): Promise<HardCase> {
  const drawing = `<g stroke-linecap="round" stroke-linejoin="round">
    <circle cx="44" cy="90" r="24" fill="#f4d21c"/>
    <path d="M84 70 L120 70 L120 106 L84 106 Z" fill="#d8342c"/>
    <path d="M24 130 C 50 118, 90 150, 126 128" stroke="#2d8a3c" stroke-width="6" fill="none"/>
    <path d="M30 150 L120 150" stroke="#f4d21c" stroke-width="7"/>
    <path d="M40 166 L110 166" stroke="#3a6fd8" stroke-width="5"/>
    <circle cx="102" cy="88" r="8" fill="#f7f5ee"/></g>`
  const ink = drawing.replace(/#f4d21c|#d8342c|#2d8a3c|#3a6fd8/g, '#000')
  return flat('coloured marker, yellow among them', { ...A5, paper: [247, 245, 238], drawing, ink: ink.replace('#f7f5ee', '#fff') + '' }, {
    light: (x) => 1 - 0.06 * x, blur: 0.8, noise: 3, seed: 16,
  })
}

export async function inkOnEdges(): Promise<HardCase> {
  // A number plate scanned tight: its border runs off every edge of the picture.
  const plate = { widthMm: 120, heightMm: 60 }
  const body = (c: string) => `<rect x="0" y="0" width="120" height="60" fill="none" stroke="${c}" stroke-width="8"/>
    <path d="M28 14 L28 46 M28 14 L16 34 L36 34 M52 14 L72 14 L58 46 M84 30 A 10 10 0 1 1 84.1 30" fill="none" stroke="${c}" stroke-width="5"/>`
  const sheet: Sheet = { ...plate, paper: [250, 250, 250], drawing: body('#151515'), ink: body('#000') }
  const img = await renderSheet(sheet, 8)
  const source = await finish(img, { blur: 0.5, noise: 3, seed: 17, png: true })
  return { name: 'ink touching the edges', source, sheet, widthMm: plate.widthMm }
}

/** A wooden table: warm brown with grain. */
function table(seed: number): (x: number, y: number) => Rgb {
  const rnd = mulberry32(seed)
  const phase = Array.from({ length: 6 }, () => rnd() * 6.28)
  return (x, y) => {
    const g = Math.sin(y * 0.05 + Math.sin(x * 0.004 + phase[0]!) * 3) * 0.5 + Math.sin(y * 0.013 + phase[1]!) * 0.5
    const k = 0.85 + 0.15 * g
    return [120 * k, 84 * k, 52 * k]
  }
}

export async function skewedWithShadow(): Promise<HardCase> {
  const sheet: Sheet = { ...A5, paper: [246, 244, 238], drawing: badge(14, 70, '#1a1a22'), ink: badge(14, 70, '#000') }
  const flatImg = await renderSheet(sheet, 8)
  const cam: Camera = { width: 1400, height: 1050, focal: 1150, tiltDeg: 28, yawDeg: -8, rollDeg: 12, distanceMm: 330, shiftMm: [0, 6] }
  const photo = photograph(flatImg, 8, A5.widthMm, A5.heightMm, cam, table(3))
  // The hand's shadow: soft, over the lower right of the picture, and light falling off.
  light(photo, (x, y) => {
    const d = Math.hypot((x - 0.68) / 0.2, (y - 0.78) / 0.3)
    return (1 - 0.45 / (1 + Math.exp((d - 1) * 6))) * (1 - 0.2 * x)
  })
  const source = await finish(photo, { blur: 0.7, noise: 4, seed: 18, quality: 85 })
  const box = await inkBoxMm(sheet)
  return { name: 'skewed photo with a hand shadow', source, sheet, widthMm: box.w }
}

export async function scene(): Promise<HardCase> {
  // A holiday snap: sky gradient, sun, hills, a house, trees and grass full of small blobs.
  const w = 1200, h = 900
  const rnd = mulberry32(19)
  let blobs = ''
  for (let i = 0; i < 500; i++) {
    const x = rnd() * w, y = 560 + rnd() * 340, r = 2 + rnd() * 9
    const g = Math.round(90 + rnd() * 100)
    blobs += `<ellipse cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" rx="${r.toFixed(1)}" ry="${(r * 0.6).toFixed(1)}" fill="rgb(${Math.round(g * 0.4)},${g},${Math.round(g * 0.3)})"/>`
  }
  let leaves = ''
  for (let i = 0; i < 300; i++) {
    const cx = [250, 900][i % 2]!, x = cx + (rnd() - 0.5) * 220, y = 330 + (rnd() - 0.5) * 220
    leaves += `<circle cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="${(4 + rnd() * 12).toFixed(1)}" fill="rgb(${Math.round(30 + rnd() * 40)},${Math.round(80 + rnd() * 70)},${Math.round(30 + rnd() * 30)})"/>`
  }
  const doc = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}">
    <defs><linearGradient id="sky" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="#3d74c4"/><stop offset="1" stop-color="#cfe3f5"/></linearGradient>
    <linearGradient id="hill" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="#6fa84a"/><stop offset="1" stop-color="#2f5e22"/></linearGradient>
    <radialGradient id="sun"><stop offset="0" stop-color="#fff6c0"/><stop offset="0.5" stop-color="#ffd84a"/><stop offset="1" stop-color="#ffd84a" stop-opacity="0"/></radialGradient></defs>
    <rect width="${w}" height="${h}" fill="url(#sky)"/><circle cx="960" cy="150" r="110" fill="url(#sun)"/>
    <path d="M0 520 Q 300 380 620 500 T 1200 470 V 900 H 0 Z" fill="url(#hill)"/>
    <rect x="240" y="420" width="60" height="250" fill="#5a3b22"/><rect x="890" y="420" width="50" height="230" fill="#4f341e"/>
    ${leaves}
    <rect x="480" y="420" width="240" height="170" fill="#d9c7a4"/><path d="M460 430 L600 330 L740 430 Z" fill="#a33a2a"/>
    <rect x="560" y="500" width="50" height="90" fill="#6b4a2b"/><rect x="500" y="450" width="40" height="35" fill="#8fb8d8"/>
    ${blobs}</svg>`
  const { data } = await sharp(Buffer.from(doc)).removeAlpha().raw().toBuffer({ resolveWithObject: true })
  const img = { rgb: Float32Array.from(data), width: w, height: h }
  const source = await finish(img, { blur: 1.2, noise: 5, seed: 20, quality: 85 })
  return { name: 'photograph of a scene', source, sheet: { widthMm: 0, heightMm: 0, paper: [0, 0, 0], drawing: '', ink: '' }, widthMm: 150, refuse: 'scene' }
}

export const HARD_CASES = [unevenLight, gridBlue, gridGrey, ruled, pencil, skewedWithShadow, marker, inkOnEdges, scene]
