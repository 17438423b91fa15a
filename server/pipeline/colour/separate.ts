// Colour separation: the ink colours of a coloured drawing, and a mask per ink.
//
// 1. Lighting: a phone photo's paper is shaded and tinted. Each channel is divided by its own
//    paper estimate (the lighting evening's closing-and-blur estimate, lighting.ts, run on each
//    of R, G and B), so the paper becomes white and every ink is seen relative to the paper
//    under it: the tint, the shading and the vignette fall away together.
// 2. Finding the inks, on a shrunk copy (at most ANALYSIS_PIXELS): pixels clearly away from
//    white and inside a flat patch of colour (their four neighbours within PURE_STEP levels)
//    are the inks' own colours; edge pixels, where ink blends into paper or into another ink,
//    are left out. Those pixels are clustered in CIELAB with k-means (ml-kmeans, k-means++
//    seeded, deterministic), and the clusters are then joined by CIEDE2000:
//      - automatic: clusters within MERGE_DE00 of each other are one ink (shading within an
//        ink, marker strokes laid twice), clusters within PAPER_DE00 of white are paper's tint,
//        clusters holding less than MIN_CLUSTER_SHARE of the sample are dropped as mixtures;
//      - a count: the clusters are joined, the cheapest join first (Ward's cost with ΔE00),
//        until that many inks remain;
//      - picked colours: each pick is an ink; clusters within MERGE_DE00 of a pick join it, any
//        other cluster becomes paper (the designer named the inks), unless a count asks for
//        more inks than picks, in which case the rest are joined down to the difference.
//    Then the designer's merges and drops apply to that list (by index), so the same choices
//    always give the same layers.
// 3. Classification of every pixel of the image given, in one pass: the evened colour, cut to
//    6 bits a channel, looks its answer up in a table filled as colours first occur (a photo
//    of a drawing has few distinct colours once evened). The answer: the nearest centre by
//    CIEDE2000 when it is within SAME_COLOUR_DE00; otherwise the pixel is a blend of two
//    centres, and goes to the one covering at least half of it (see nearestBlend). Every
//    cluster an ink is made of is a centre of its own, so a shaded ink is matched by its
//    nearest shade; white and the paper's tint are centres that mean paper.
import sharp from 'sharp'
import { kmeans } from 'ml-kmeans'
import { paperEstimate } from '../lighting'
import { colourName, deltaE00, labToHex, labToSrgb255, paperTint, srgbToLab, WHITE, type Lab } from './lab'

/** Most inks a drawing is separated into. */
export const MAX_INKS = 6
/** The label of a paper pixel. */
export const PAPER = 255
/** The shrunk copy the inks are found on holds at most this many pixels. */
export const ANALYSIS_PIXELS = 500_000
/** Colours within this CIEDE2000 of an ink's colour are that ink (our setting, tested on photos made in code). */
export const MERGE_DE00 = 12
/** Colours within this CIEDE2000 of white are the paper (its noise and leftover shading). */
export const PAPER_DE00 = 10
/** A colour within this CIEDE2000 of a centre is that centre's colour; further off, a blend of two. */
const SAME_COLOUR_DE00 = 7
/** Flat patch: the four neighbours within this many levels in every channel. */
const PURE_STEP = 24
/** A cluster holding less than this share of the inks' own pixels is a mixture, not an ink. */
const MIN_CLUSTER_SHARE = 0.01
/** Clusters made before joining them. */
const CLUSTERS = 10
/** Sample size for k-means. */
const SAMPLE = 4_000
const UNKNOWN = 254

export interface RgbImage {
  /** 8-bit sRGB, row-major, `channels` per pixel: 1 grey, 2 grey + alpha, 3 RGB, 4 RGBA. */
  data: Uint8Array
  width: number
  height: number
  channels: 1 | 2 | 3 | 4
}

/** A colour picked from the source: the pixel (x, y) of the image given, or a disc of `radius` pixels about it. */
export interface ColourPick { x: number, y: number, radius?: number }

export interface SeparationChoices {
  /** 1–6 inks; null or absent: automatic (or as many as the picks). */
  count?: number | null
  picks?: ColourPick[]
  /** Pairs of indices into `found` whose inks become one. */
  merge?: Array<[number, number]>
  /** Indices into `found` whose pixels become paper. */
  drop?: number[]
}

export interface SeparationOptions {
  /** Divide out the paper's shading and tint (default true); false takes the paper as one flat colour. */
  evenLighting?: boolean
  analysisPixels?: number
}

/** An ink as found, before the designer's merges and drops. */
export interface FoundInk {
  lab: Lab
  hex: string
  name: string
  /** Share of the inks' own (flat-patch) pixels in the shrunk copy. */
  sampleShare: number
}

export interface InkLayer {
  /** Indices into `found` this ink is made of. */
  from: number[]
  lab: Lab
  hex: string
  name: string
  /** 1 = this ink, 0 = anything else; row-major, width × height (the prepared bitmap's form). */
  mask: Uint8Array
  pixels: number
  /** Share of all pixels. */
  share: number
}

export interface PaperInfo {
  /** The paper's mean colour as photographed (before evening). */
  lab: Lab
  hex: string
  /** 'cream', 'bluish', 'grey' …, or null for plain white. */
  tint: string | null
  /** Spread of the paper's lightness across the picture (L*, 5th to 95th percentile): the shading evened out. */
  shadingL: number
}

export interface Separation {
  width: number
  height: number
  /** Inks in stack order, bottom first (lightest first). */
  inks: InkLayer[]
  found: FoundInk[]
  paper: PaperInfo
  /** Per pixel: index into `inks`, or PAPER. */
  labels: Uint8Array
  sentence: string
  timings: { analyseMs: number, classifyMs: number, totalMs: number }
}

// ---------------------------------------------------------------------------------------
// Pixels
// ---------------------------------------------------------------------------------------

/** Three 8-bit channels per pixel, alpha flattened onto white. */
export function toRgb3(img: RgbImage): Uint8Array {
  const { data, width, height, channels } = img
  const n = width * height
  if (data.length < n * channels) throw new RangeError(`The image holds ${data.length} bytes, fewer than ${width} × ${height} × ${channels}.`)
  if (channels === 3) return data.length === n * 3 ? data : data.subarray(0, n * 3)
  const out = new Uint8Array(n * 3)
  for (let i = 0; i < n; i++) {
    const s = i * channels
    const alpha = channels === 2 || channels === 4 ? data[s + channels - 1]! / 255 : 1
    for (let c = 0; c < 3; c++) {
      const v = channels <= 2 ? data[s]! : data[s + c]!
      out[i * 3 + c] = Math.round(v * alpha + 255 * (1 - alpha))
    }
  }
  return out
}

async function resizeRgb(rgb: Uint8Array, width: number, height: number, toWidth: number, toHeight: number): Promise<Uint8Array> {
  if (toWidth === width && toHeight === height) return rgb
  const { data, info } = await sharp(rgb, { raw: { width, height, channels: 3 } })
    .resize(toWidth, toHeight, { fit: 'fill', kernel: toWidth * toHeight < width * height ? 'lanczos3' : 'cubic' })
    .raw().toBuffer({ resolveWithObject: true })
  if (info.channels !== 3 || info.width !== toWidth || info.height !== toHeight) throw new Error('Unexpected resize result.')
  return new Uint8Array(data.buffer, data.byteOffset, data.length)
}

/** Short side of the copy the paper is estimated on (lighting.ts works at 256 for grey; three channels here, and the estimate is smooth). */
const PAPER_SHORT_SIDE = 128

/**
 * Per-channel paper estimate (lighting.ts's closing and blur on each of R, G, B), made on a
 * copy PAPER_SHORT_SIDE pixels on its short side: the estimate is smooth by construction.
 * `even` false: one flat paper colour, the estimate's mean.
 */
async function paperRgb(rgb: Uint8Array, width: number, height: number, even: boolean): Promise<{ data: Uint8Array, width: number, height: number }> {
  const f = Math.min(1, PAPER_SHORT_SIDE / Math.min(width, height))
  const pw = Math.max(1, Math.round(width * f)), ph = Math.max(1, Math.round(height * f))
  const small = await resizeRgb(rgb, width, height, pw, ph)
  const n = pw * ph
  const out = new Uint8Array(n * 3)
  const channel = new Uint8Array(n)
  for (let c = 0; c < 3; c++) {
    for (let i = 0; i < n; i++) channel[i] = small[i * 3 + c]!
    const est = await paperEstimate(channel, pw, ph, { workShortSide: PAPER_SHORT_SIDE })
    let sum = 0
    for (let i = 0; i < n; i++) sum += est[i]!
    const mean = Math.round(sum / n)
    for (let i = 0; i < n; i++) out[i * 3 + c] = even ? est[i]! : mean
  }
  return { data: out, width: pw, height: ph }
}

let divisions: Uint8Array | null = null

/** v × 255 ÷ p, rounded and clamped to 255, at [p × 256 + v]: the evening of one value by its paper. */
function divisionTable(): Uint8Array {
  if (!divisions) {
    divisions = new Uint8Array(256 * 256)
    for (let p = 0; p < 256; p++) {
      for (let v = 0; v < 256; v++) divisions[(p << 8) | v] = Math.min(255, Math.round((v * 255) / (p || 1)))
    }
  }
  return divisions
}

/** The image divided by the paper, channel by channel: paper → white. */
function evened(rgb: Uint8Array, paper: Uint8Array): Uint8Array {
  const div = divisionTable()
  const out = new Uint8Array(rgb.length)
  for (let i = 0; i < rgb.length; i++) out[i] = div[(paper[i]! << 8) | rgb[i]!]!
  return out
}

/** Colours cut to 6 bits a channel: a table index. */
const key6 = (r: number, g: number, b: number) => ((r >> 2) << 12) | ((g >> 2) << 6) | (b >> 2)

/**
 * CIELAB of each 6-bit colour cell (its middle), computed once per cell on first use and kept
 * for the life of the thread (the cells never change; 6 MB when all are filled).
 */
class LabCells {
  private readonly lab = new Float64Array(64 * 64 * 64 * 3)
  private readonly known = new Uint8Array(64 * 64 * 64)
  get(key: number): Lab {
    if (!this.known[key]) {
      const mid = (q: number) => q * 4 + 1.5
      const c = srgbToLab(mid(key >> 12), mid((key >> 6) & 63), mid(key & 63))
      this.lab[key * 3] = c.l
      this.lab[key * 3 + 1] = c.a
      this.lab[key * 3 + 2] = c.b
      this.known[key] = 1
    }
    return { l: this.lab[key * 3]!, a: this.lab[key * 3 + 1]!, b: this.lab[key * 3 + 2]! }
  }
}

const cells = new LabCells()
const white = new Float64Array(64 * 64 * 64).fill(-1)
const whiteDistance = (key: number) => (white[key]! >= 0 ? white[key]! : (white[key] = deltaE00(cells.get(key), WHITE)))

// ---------------------------------------------------------------------------------------
// Finding the inks
// ---------------------------------------------------------------------------------------

interface Cluster { lab: Lab, weight: number, centres: Lab[] }

function mixLab(a: Cluster, b: Cluster): Lab {
  const w = a.weight + b.weight
  return {
    l: (a.lab.l * a.weight + b.lab.l * b.weight) / w,
    a: (a.lab.a * a.weight + b.lab.a * b.weight) / w,
    b: (a.lab.b * a.weight + b.lab.b * b.weight) / w,
  }
}

function join(a: Cluster, b: Cluster): Cluster {
  return { lab: mixLab(a, b), weight: a.weight + b.weight, centres: [...a.centres, ...b.centres] }
}

/** Joins the pair `cost` rates cheapest while `go(cost)` allows; returns the remaining clusters. */
function agglomerate(clusters: Cluster[], cost: (a: Cluster, b: Cluster) => number, go: (cost: number, count: number) => boolean): Cluster[] {
  const list = [...clusters]
  while (list.length > 1) {
    let best = Infinity, bi = -1, bj = -1
    for (let i = 0; i < list.length; i++) {
      for (let j = i + 1; j < list.length; j++) {
        const c = cost(list[i]!, list[j]!)
        if (c < best) { best = c; bi = i; bj = j }
      }
    }
    if (!go(best, list.length)) break
    const merged = join(list[bi]!, list[bj]!)
    list.splice(bj, 1)
    list[bi] = merged
  }
  return list
}

const colourDistance = (a: Cluster, b: Cluster) => deltaE00(a.lab, b.lab)
/** Ward's cost of joining two clusters, with ΔE00 as the distance: small clusters join first. */
const wardCost = (a: Cluster, b: Cluster) => (a.weight * b.weight) / (a.weight + b.weight) * deltaE00(a.lab, b.lab) ** 2

/** Two pixels (byte offsets) within PURE_STEP levels in every channel. */
function near(rgb: Uint8Array, p: number, q: number): boolean {
  return Math.abs(rgb[q]! - rgb[p]!) <= PURE_STEP && Math.abs(rgb[q + 1]! - rgb[p + 1]!) <= PURE_STEP && Math.abs(rgb[q + 2]! - rgb[p + 2]!) <= PURE_STEP
}

/** Evened colours of the flat ink patches of the shrunk copy, in CIELAB. */
function inkSample(even: Uint8Array, width: number, height: number): Lab[] {
  const pure = new Int32Array(width * height)
  const loose = new Int32Array(width * height)
  let nPure = 0, nLoose = 0
  const row = width * 3
  for (let y = 1; y < height - 1; y++) {
    for (let x = 1; x < width - 1; x++) {
      const i = y * width + x
      const p = i * 3
      const key = key6(even[p]!, even[p + 1]!, even[p + 2]!)
      if (whiteDistance(key) <= PAPER_DE00) continue
      loose[nLoose++] = key
      const flat = near(even, p, p - 3) && near(even, p, p + 3) && near(even, p, p - row) && near(even, p, p + row)
      if (flat) pure[nPure++] = key
    }
  }
  // A drawing of thin lines only has no flat patches at this size: take every ink pixel then.
  const [keys, count] = nPure >= 50 ? [pure, nPure] : [loose, nLoose]
  const step = Math.max(1, Math.ceil(count / SAMPLE))
  const out: Lab[] = []
  for (let i = 0; i < count; i += step) out.push(cells.get(keys[i]!))
  return out
}

function kmeansClusters(sample: Lab[]): Cluster[] {
  const distinct = new Set(sample.map((c) => `${c.l},${c.a},${c.b}`)).size
  const k = Math.min(CLUSTERS, distinct)
  if (k === 0) return []
  const data = sample.map((c) => [c.l, c.a, c.b])
  const result = kmeans(data, k, { seed: 11, initialization: 'kmeans++', maxIterations: 60 })
  const weight = new Array<number>(k).fill(0)
  for (const c of result.clusters) weight[c]!++
  return result.centroids
    .map((c, i) => ({ lab: { l: c[0]!, a: c[1]!, b: c[2]! }, weight: weight[i]!, centres: [{ l: c[0]!, a: c[1]!, b: c[2]! }] }))
    .filter((c) => c.weight > 0)
}

/** Median evened colour in a disc about a pick (coordinates of the image given, scaled to the shrunk copy). */
function pickedColour(pick: ColourPick, even: Uint8Array, aw: number, ah: number, scale: number): Lab {
  const cx = Math.min(aw - 1, Math.max(0, Math.floor(pick.x * scale)))
  const cy = Math.min(ah - 1, Math.max(0, Math.floor(pick.y * scale)))
  const r = Math.max(0, Math.round((pick.radius ?? 0) * scale))
  const values: number[][] = [[], [], []]
  for (let y = Math.max(0, cy - r); y <= Math.min(ah - 1, cy + r); y++) {
    for (let x = Math.max(0, cx - r); x <= Math.min(aw - 1, cx + r); x++) {
      if ((x - cx) ** 2 + (y - cy) ** 2 > r * r) continue
      for (let c = 0; c < 3; c++) values[c]!.push(even[(y * aw + x) * 3 + c]!)
    }
  }
  const median = (v: number[]) => { v.sort((a, b) => a - b); return v[v.length >> 1]! }
  return srgbToLab(median(values[0]!), median(values[1]!), median(values[2]!))
}

function checkChoices(choices: SeparationChoices, width: number, height: number): void {
  const { count, picks = [] } = choices
  if (count != null && (!Number.isInteger(count) || count < 1 || count > MAX_INKS)) throw new RangeError(`The number of inks must be a whole number from 1 to ${MAX_INKS}.`)
  if (picks.length > MAX_INKS) throw new RangeError(`At most ${MAX_INKS} colours can be picked.`)
  for (const p of picks) {
    if (!(p.x >= 0 && p.x < width && p.y >= 0 && p.y < height)) throw new RangeError(`A picked point (${p.x}, ${p.y}) lies outside the ${width} × ${height} picture.`)
    if (p.radius !== undefined && !(p.radius >= 0 && p.radius <= Math.max(width, height))) throw new RangeError('A pick radius must be a number of pixels, 0 or more.')
  }
}

/** The inks as found (lightest first), and the centres that mean paper. */
function findInks(sample: Lab[], choices: SeparationChoices, picked: Lab[]): { inks: Cluster[], paper: Lab[] } {
  const clusters = kmeansClusters(sample)
  const paper = clusters.filter((c) => deltaE00(c.lab, WHITE) <= PAPER_DE00 * 1.2)
  let candidates = clusters.filter((c) => !paper.includes(c))
  const count = choices.count ?? null
  let inks: Cluster[]
  if (picked.length > 0) {
    inks = picked.map((lab) => ({ lab, weight: 0, centres: [lab] }))
    const free: Cluster[] = []
    for (const c of candidates) {
      let best = -1, bestD = MERGE_DE00
      inks.forEach((ink, i) => { const d = deltaE00(ink.lab, c.lab); if (d < bestD) { bestD = d; best = i } })
      if (best >= 0) inks[best] = { lab: inks[best]!.lab, weight: inks[best]!.weight + c.weight, centres: [...inks[best]!.centres, ...c.centres] }
      else free.push(c)
    }
    const more = count === null ? 0 : Math.max(0, count - picked.length)
    const extra = more > 0 ? agglomerate(free, wardCost, (_, n) => n > more) : []
    for (const c of free) if (!extra.some((e) => e.centres.includes(c.centres[0]!))) paper.push(c)
    inks = [...inks, ...extra]
  } else if (count !== null) {
    inks = agglomerate(candidates, wardCost, (_, n) => n > count)
  } else {
    candidates = agglomerate(candidates, colourDistance, (d) => d < MERGE_DE00)
    const total = candidates.reduce((s, c) => s + c.weight, 0)
    inks = candidates.filter((c) => c.weight >= MIN_CLUSTER_SHARE * total)
    inks = agglomerate(inks, wardCost, (_, n) => n > MAX_INKS)
  }
  inks.sort((a, b) => b.lab.l - a.lab.l)
  return { inks, paper: paper.flatMap((c) => c.centres) }
}

// ---------------------------------------------------------------------------------------
// Naming and the sentence
// ---------------------------------------------------------------------------------------

/** Names for a list of colours, told apart by "light"/"dark" where two share a word. */
export function distinctNames(labs: Lab[]): string[] {
  const names = labs.map(colourName)
  const groups = new Map<string, number[]>()
  names.forEach((n, i) => groups.set(n, [...(groups.get(n) ?? []), i]))
  for (const [name, idx] of groups) {
    if (idx.length < 2) continue
    const byL = [...idx].sort((a, b) => labs[b]!.l - labs[a]!.l)
    byL.forEach((i, rank) => {
      if (rank === 0) names[i] = name.startsWith('light ') ? name : `light ${name}`
      else if (rank === byL.length - 1) names[i] = name.startsWith('dark ') ? name : `dark ${name}`
      else names[i] = `${name} ${rank + 1}`
    })
  }
  return names
}

function listWords(words: string[]): string {
  if (words.length <= 1) return words.join('')
  return `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`
}

/** The sentence an upload shows: how many inks, their colours, and what was left out. */
export function separationSentence(inkNames: string[], paper: Pick<PaperInfo, 'tint' | 'shadingL'>, changes: { merged: number, dropped: number } = { merged: 0, dropped: 0 }): string {
  const shaded = paper.shadingL >= 8
  const left = paper.tint
    ? `the paper's ${paper.tint} tint${shaded ? ' and its shading were' : ' was'} left out`
    : `the paper${shaded ? ' and its shading were' : ' was'} left out`
  const notes: string[] = []
  if (changes.merged > 0) notes.push(`${changes.merged} merged`)
  if (changes.dropped > 0) notes.push(`${changes.dropped} dropped`)
  const note = notes.length ? ` (${notes.join(', ')})` : ''
  if (inkNames.length === 0) return `No ink found${note}: the picture reads as bare paper.`
  const n = inkNames.length
  return `${n} ${n === 1 ? 'ink' : 'inks'} found${note}: ${listWords(inkNames)}; ${left}.`
}

/**
 * A colour near no centre is a blend of two (an edge, anti-aliased or blurred by the lens):
 * the pair whose mixing line in sRGB values passes nearest to it (a blend is a weighted mean of
 * the two), and of the two the one covering at least half of the pixel. Nearest by ΔE00 alone
 * would not split edges at half: CIEDE2000 shrinks chroma differences of strong colours, so a
 * yellow edge would grow into the paper, and the grey edge of a black line would read as
 * whichever ink lies nearest to grey.
 */
function nearestBlend(key: number, centres: Array<[number, number, number]>, target: number[]): number {
  const p = [(key >> 12) * 4 + 1.5, ((key >> 6) & 63) * 4 + 1.5, (key & 63) * 4 + 1.5]
  let best = Infinity, label = PAPER
  const dist2 = (q: number[]) => (p[0]! - q[0]!) ** 2 + (p[1]! - q[1]!) ** 2 + (p[2]! - q[2]!) ** 2
  centres.forEach((c, i) => { const d = dist2(c); if (d < best) { best = d; label = target[i]! } })
  for (let i = 0; i < centres.length; i++) {
    for (let j = i + 1; j < centres.length; j++) {
      if (target[i] === target[j]) continue
      const a = centres[i]!, b = centres[j]!
      let dot = 0, len2 = 0
      for (let c = 0; c < 3; c++) { const axis = a[c]! - b[c]!; dot += (p[c]! - b[c]!) * axis; len2 += axis * axis }
      const t = len2 === 0 ? 1 : Math.min(1, Math.max(0, dot / len2))
      const d = dist2([0, 1, 2].map((c) => b[c]! + t * (a[c]! - b[c]!)))
      if (d < best) { best = d; label = t >= 0.5 ? target[i]! : target[j]! }
    }
  }
  return label
}

// ---------------------------------------------------------------------------------------
// The whole separation
// ---------------------------------------------------------------------------------------

function meanLab(c: Lab[], weights: number[]): Lab {
  const w = weights.reduce((s, x) => s + x, 0) || 1
  return {
    l: c.reduce((s, x, i) => s + x.l * weights[i]!, 0) / w,
    a: c.reduce((s, x, i) => s + x.a * weights[i]!, 0) / w,
    b: c.reduce((s, x, i) => s + x.b * weights[i]!, 0) / w,
  }
}

function paperInfo(paperSmall: Uint8Array): PaperInfo {
  const n = paperSmall.length / 3
  let r = 0, g = 0, b = 0
  const ls: number[] = []
  const step = Math.max(1, Math.floor(n / 4000))
  for (let i = 0; i < n; i++) {
    r += paperSmall[i * 3]!; g += paperSmall[i * 3 + 1]!; b += paperSmall[i * 3 + 2]!
    if (i % step === 0) ls.push(srgbToLab(paperSmall[i * 3]!, paperSmall[i * 3 + 1]!, paperSmall[i * 3 + 2]!).l)
  }
  ls.sort((x, y) => x - y)
  const lab = srgbToLab(r / n, g / n, b / n)
  return {
    lab, hex: labToHex(lab), tint: paperTint(lab),
    shadingL: ls[Math.floor(ls.length * 0.95)]! - ls[Math.floor(ls.length * 0.05)]!,
  }
}

/** Groups of `found` after the merges, in order of their first member; dropped ones apart. */
function applyChoices(foundCount: number, choices: SeparationChoices): { groups: number[][], dropped: Set<number> } {
  const parent = Array.from({ length: foundCount }, (_, i) => i)
  const root = (i: number): number => (parent[i] === i ? i : (parent[i] = root(parent[i]!)))
  const check = (i: number) => {
    if (!Number.isInteger(i) || i < 0 || i >= foundCount) throw new RangeError(`There is no ink number ${i} to merge or drop (found ${foundCount}).`)
    return i
  }
  for (const [a, b] of choices.merge ?? []) {
    const ra = root(check(a)), rb = root(check(b))
    if (ra !== rb) parent[Math.max(ra, rb)] = Math.min(ra, rb)
  }
  const dropped = new Set((choices.drop ?? []).map(check))
  const groups = new Map<number, number[]>()
  for (let i = 0; i < foundCount; i++) {
    if (dropped.has(i)) continue
    const r = root(i)
    groups.set(r, [...(groups.get(r) ?? []), i])
  }
  // A group is dropped as a whole when any of its members is.
  const kept = [...groups.values()].filter((g) => !g.some((i) => dropped.has(i)))
  for (let i = 0; i < foundCount; i++) if (!kept.some((g) => g.includes(i))) dropped.add(i)
  return { groups: kept.sort((x, y) => x[0]! - y[0]!), dropped }
}

/**
 * Separates a coloured drawing into ink layers. Every pixel of `image` is classified; the
 * masks have its size. `choices` are the designer's (automatic when empty).
 */
export async function separateColours(image: RgbImage, choices: SeparationChoices = {}, options: SeparationOptions = {}): Promise<Separation> {
  const t0 = performance.now()
  const { width, height } = image
  checkChoices(choices, width, height)
  const rgb = toRgb3(image)
  const limit = options.analysisPixels ?? ANALYSIS_PIXELS
  const scale = Math.min(1, Math.sqrt(limit / (width * height)))
  const aw = Math.max(1, Math.round(width * scale)), ah = Math.max(1, Math.round(height * scale))
  const small = await resizeRgb(rgb, width, height, aw, ah)
  const paperEst = await paperRgb(small, aw, ah, options.evenLighting !== false)
  const paperSmall = await resizeRgb(paperEst.data, paperEst.width, paperEst.height, aw, ah)
  const evenSmall = evened(small, paperSmall)

  const sample = inkSample(evenSmall, aw, ah)
  const picked = (choices.picks ?? []).map((p) => pickedColour(p, evenSmall, aw, ah, aw / width))
  const { inks: clusters, paper: paperCentres } = findInks(sample, choices, picked)
  const total = clusters.reduce((s, c) => s + c.weight, 0) || 1
  const foundNames = distinctNames(clusters.map((c) => c.lab))
  const found: FoundInk[] = clusters.map((c, i) => ({ lab: c.lab, hex: labToHex(c.lab), name: foundNames[i]!, sampleShare: c.weight / total }))
  const { groups, dropped } = applyChoices(found.length, choices)
  const t1 = performance.now()

  // Centres and what each one means: an ink's index, or paper.
  const centres: Lab[] = [WHITE, ...paperCentres]
  const target: number[] = centres.map(() => PAPER)
  clusters.forEach((c, i) => {
    const g = groups.findIndex((grp) => grp.includes(i))
    for (const centre of c.centres) { centres.push(centre); target.push(g >= 0 ? g : PAPER) }
  })
  const lut = new Uint8Array(64 * 64 * 64).fill(UNKNOWN)
  const centreRgb = centres.map(labToSrgb255)
  const classify = (key: number): number => {
    const c = cells.get(key)
    let first = 0, best = Infinity
    centres.forEach((centre, j) => { const d = deltaE00(c, centre); if (d < best) { best = d; first = j } })
    return (lut[key] = best <= SAME_COLOUR_DE00 ? target[first]! : nearestBlend(key, centreRgb, target))
  }
  const paperFull = await resizeRgb(paperEst.data, paperEst.width, paperEst.height, width, height)
  const n = width * height
  const labels = new Uint8Array(n)
  const masks = groups.map(() => new Uint8Array(n))
  const pixels = new Array<number>(groups.length).fill(0)
  const div = divisionTable()
  for (let i = 0, p = 0; i < n; i++, p += 3) {
    const key = key6(div[(paperFull[p]! << 8) | rgb[p]!]!, div[(paperFull[p + 1]! << 8) | rgb[p + 1]!]!, div[(paperFull[p + 2]! << 8) | rgb[p + 2]!]!)
    const v = lut[key]!
    const label = v === UNKNOWN ? classify(key) : v
    labels[i] = label
    if (label !== PAPER) { masks[label]![i] = 1; pixels[label]!++ }
  }
  const names = distinctNames(groups.map((g) => meanLab(g.map((i) => found[i]!.lab), g.map((i) => clusters[i]!.weight || 1))))
  const inks: InkLayer[] = groups.map((g, k) => {
    const lab = meanLab(g.map((i) => found[i]!.lab), g.map((i) => clusters[i]!.weight || 1))
    return { from: g, lab, hex: labToHex(lab), name: names[k]!, mask: masks[k]!, pixels: pixels[k]!, share: pixels[k]! / n }
  })
  const paper = paperInfo(paperEst.data)
  const merged = groups.reduce((s, g) => s + g.length - 1, 0)
  const t2 = performance.now()
  return {
    width, height, inks, found, paper, labels,
    sentence: separationSentence(inks.map((i) => i.name), paper, { merged, dropped: dropped.size }),
    timings: { analyseMs: t1 - t0, classifyMs: t2 - t1, totalMs: t2 - t0 },
  }
}
