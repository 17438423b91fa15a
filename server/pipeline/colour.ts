// Reading ink from colour: how much a pixel differs from the paper's own colour.
//
// Luma alone sees a yellow marker on white as nearly paper (BT.709 luma of pure yellow is
// 237 of 255). A careful reader asks instead, channel by channel, how much light the ink
// absorbed compared with the paper around it. Per channel c, with I the pixel and P the local
// paper (both gamma-encoded 8-bit values, as stored):
//
//   D_c = ln(P_c / I_c)                   (an optical density: 0 on paper, larger for ink)
//
// Densities of layers laid over each other add (a pencil stroke across a printed grid line
// has about the sum of the two), which is why dropping a colour works in this space:
// subtracting each pixel's component along the dropped colour's density direction removes
// that colour wherever it lies and leaves what was drawn over it (colour deconvolution, as in
// A. C. Ruifrok, D. A. Johnston, "Quantification of histochemical staining by color
// deconvolution", Anal. Quant. Cytol. Histol. 23 (2001) 291–299). The pixel's ink strength is
// then its largest remaining density, so ink of any colour counts in the channel where it is
// darkest, and the grey reading is 255 · exp(−strength): paper 255, ink darker.
//
// The paper's colour is taken as one hue (its ratios between channels, e.g. a warm tint) whose
// brightness may vary over the sheet (P_c = ratio_c · paper brightness there), so the same
// paper-brightness map that lighting evening divides by serves here too.
import { LUMA, toGrey, type LumaStandard } from './luma'

export type Rgb = [number, number, number]

export interface PaperColour {
  /** Mean colour of the paper's pixels, 8-bit R′G′B′. */
  rgb: Rgb
  /** Its luma (the standard the run uses). */
  luma: number
  /** rgb ÷ luma per channel: the paper's hue, independent of how brightly it is lit. */
  ratio: Rgb
}

/**
 * The paper's colour: the mean of the pixels whose luma lies in the upper half of the image's
 * luma range actually used by most pixels (between the median and the 99th percentile), so ink,
 * shadows and blown highlights are left out. Assumes the paper covers at least half the image.
 */
export function estimatePaperColour(rgb: Uint8Array, n: number, standard: LumaStandard, luma?: Uint8Array): PaperColour {
  const k = LUMA[standard]
  const lum = luma ?? toGrey(rgb, n, 1, 3, standard)
  const hist = new Uint32Array(256)
  for (let i = 0; i < n; i++) hist[lum[i]!]!++
  const level = (q: number) => {
    let acc = 0
    for (let v = 0; v < 256; v++) { acc += hist[v]!; if (acc >= q * n) return v }
    return 255
  }
  const lo = level(0.5), hi = level(0.99)
  let sr = 0, sg = 0, sb = 0, m = 0
  for (let i = 0, j = 0; i < n; i++, j += 3) {
    const y = lum[i]!
    if (y < lo || y > hi) continue
    sr += rgb[j]!; sg += rgb[j + 1]!; sb += rgb[j + 2]!; m++
  }
  if (m === 0) return { rgb: [255, 255, 255], luma: 255, ratio: [1, 1, 1] }
  const c: Rgb = [sr / m, sg / m, sb / m]
  const l = Math.max(1, k.r * c[0] + k.g * c[1] + k.b * c[2])
  return { rgb: c, luma: l, ratio: [c[0] / l, c[1] / l, c[2] / l] }
}

/** ln of each 8-bit level, with 0 read as half a level (a density of about 6 on white paper). */
const LN = Float64Array.from({ length: 256 }, (_, v) => Math.log(Math.max(0.5, v)))

/** exp(−s) × 255 for s in steps of 1/512 up to 8 (beyond, 0). */
const EXP_STEPS = 512
const EXP = Uint8Array.from({ length: 8 * EXP_STEPS + 1 }, (_, i) => Math.round(255 * Math.exp(-i / EXP_STEPS)))

/** Unit vector along a colour's density direction against the paper (for dropping it). */
export function densityDirection(colour: Rgb, paper: PaperColour): Rgb | null {
  const d: Rgb = [0, 1, 2].map((c) => Math.log(Math.max(1, paper.rgb[c]!) / Math.max(0.5, colour[c]!))) as Rgb
  const len = Math.hypot(...d)
  if (!(len > 1e-3)) return null
  return [d[0] / len, d[1] / len, d[2] / len]
}

/** Gram–Schmidt: an orthonormal set spanning the given directions (dependent ones dropped). */
export function orthonormal(dirs: readonly Rgb[]): Rgb[] {
  const out: Rgb[] = []
  for (const d of dirs) {
    const v: Rgb = [...d]
    for (const u of out) {
      const a = v[0] * u[0] + v[1] * u[1] + v[2] * u[2]
      v[0] -= a * u[0]; v[1] -= a * u[1]; v[2] -= a * u[2]
    }
    const len = Math.hypot(...v)
    if (len > 0.2) out.push([v[0] / len, v[1] / len, v[2] / len])
  }
  return out
}

export interface DensityOptions {
  paper: PaperColour
  /**
   * Paper brightness (luma) at every pixel, same size as the image; null: the paper's mean
   * luma everywhere (no lighting evening).
   */
  paperLuma: Uint8Array | null
  /** Colours read as paper: unit density directions, orthonormal (see orthonormal()). */
  dropped: readonly Rgb[]
  /** 0…1: how much of the lighting map is used (the strength of lighting evening). */
  strength?: number
}

/**
 * Grey reading by density: 255 · exp(−max_c D′_c), D′ being the pixel's densities against the
 * local paper with the dropped colours' components taken out. Interleaved R′G′B′ in, one
 * byte per pixel out.
 */
export function densityGrey(rgb: Uint8Array, n: number, o: DensityOptions): Uint8Array {
  const out = new Uint8Array(n)
  const lnRatio = o.paper.ratio.map((r) => Math.log(r)) as Rgb
  const lnMean = Math.log(o.paper.luma)
  const strength = o.strength ?? 1
  const drops = o.dropped
  for (let i = 0, j = 0; i < n; i++, j += 3) {
    // ln of the local paper's brightness: the map, blended with the mean by the strength
    const lp = o.paperLuma ? lnMean + strength * (LN[o.paperLuma[i]!]! - lnMean) : lnMean
    let d0 = lnRatio[0] + lp - LN[rgb[j]!]!
    let d1 = lnRatio[1] + lp - LN[rgb[j + 1]!]!
    let d2 = lnRatio[2] + lp - LN[rgb[j + 2]!]!
    for (const u of drops) {
      const a = d0 * u[0] + d1 * u[1] + d2 * u[2]
      if (a > 0) { d0 -= a * u[0]; d1 -= a * u[1]; d2 -= a * u[2] }
    }
    let s = d0 > d1 ? d0 : d1
    if (d2 > s) s = d2
    out[i] = s <= 0 ? 255 : s >= 8 ? 0 : EXP[Math.round(s * EXP_STEPS)]!
  }
  return out
}

/**
 * Densities against the paper (no colour dropped) of single pixels, for analysing ink
 * colours: `at(i)` fills and returns the same 3-element buffer each time.
 */
export function densityReader(rgb: Uint8Array, paper: PaperColour, paperLuma: Uint8Array | null): { at(i: number): Float64Array } {
  const out = new Float64Array(3)
  const lnRatio = paper.ratio.map((r) => Math.log(r)) as Rgb
  const lnMean = Math.log(paper.luma)
  return {
    at(i) {
      const lp = paperLuma ? LN[paperLuma[i]!]! : lnMean
      const j = i * 3
      out[0] = lnRatio[0] + lp - LN[rgb[j]!]!
      out[1] = lnRatio[1] + lp - LN[rgb[j + 1]!]!
      out[2] = lnRatio[2] + lp - LN[rgb[j + 2]!]!
      return out
    },
  }
}

/** How coloured a density vector is: 0 for grey ink (equal in every channel), towards 1 for one channel only. */
export function chroma(d0: number, d1: number, d2: number): number {
  const max = Math.max(d0, d1, d2)
  if (!(max > 0)) return 0
  const min = Math.max(0, Math.min(d0, d1, d2))
  return (max - min) / max
}

/** The colour a density vector stands for, on the given paper: I_c = P_c · exp(−D_c). */
export function colourOfDensity(d: Rgb, paper: PaperColour): Rgb {
  return [0, 1, 2].map((c) => Math.max(0, Math.min(255, Math.round(paper.rgb[c]! * Math.exp(-d[c]!))))) as Rgb
}

export function toHex(c: Rgb): string {
  return '#' + c.map((v) => Math.max(0, Math.min(255, Math.round(v))).toString(16).padStart(2, '0')).join('')
}

export function fromHex(hex: string): Rgb {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex)
  if (!m) throw new RangeError(`Not a #rrggbb colour: ${hex}`)
  return [parseInt(m[1]!, 16), parseInt(m[2]!, 16), parseInt(m[3]!, 16)]
}

/** Hue angle of a colour, degrees (0 red, 120 green, 240 blue); 0 for greys. */
export function hue(c: Rgb): number {
  const [r, g, b] = c
  const max = Math.max(r, g, b), min = Math.min(r, g, b)
  if (max === min) return 0
  let h: number
  if (max === r) h = 60 * (((g - b) / (max - min)) % 6)
  else if (max === g) h = 60 * ((b - r) / (max - min) + 2)
  else h = 60 * ((r - g) / (max - min) + 4)
  return h < 0 ? h + 360 : h
}

/** A plain name for a colour, for the reasons a designer reads ("blue", "grey", "yellow"). */
export function colourName(c: Rgb): string {
  const [r, g, b] = c.map((v) => v / 255) as Rgb
  const max = Math.max(r, g, b), min = Math.min(r, g, b)
  const l = (max + min) / 2
  const s = max === min ? 0 : (max - min) / (1 - Math.abs(2 * l - 1))
  if (s < 0.2 || max - min < 0.08) return l > 0.85 ? 'white' : l < 0.2 ? 'black' : 'grey'
  const h = hue(c)
  const names: [number, string][] = [[15, 'red'], [45, 'orange'], [70, 'yellow'], [160, 'green'], [200, 'cyan'], [255, 'blue'], [290, 'violet'], [335, 'pink'], [360, 'red']]
  return names.find(([edge]) => h < edge)![1]
}
