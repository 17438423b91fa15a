// The skeleton of the ink, and which parts of it are the bodies of strokes.
//
// Skeleton: the ink thinned to lines one pixel wide along its middle. First a pinhole (a paper
// pixel with ink on its four sides) is read as ink. Then the ink pixels are taken in order of
// increasing distance to the paper (exact squared distances, bucket sorted, so linear in the
// pixels), those at one distance together, and a pixel is removed when removing it changes
// nothing about the ink's shape in the large: it touches paper across an edge, it is not the
// end of a line (it has at least two ink neighbours), and its ink neighbours stay one
// 8-connected group without it. What remains runs along the ridge of the distance to the
// paper — the middle of every stroke — keeps every piece in one piece and every hole a hole,
// and has branches that end at the tips of strokes and in the corners of shapes.
//
// Stroke bodies: a skeleton pixel p at distance D(p) from the paper lies in an END TAPER when
// it can be reached from an end of the skeleton along a path on which the distance never drops
// more than RISE_TOLERANCE_PX below its largest value so far (the ink only widens, within
// pixel noise, from the end to p), and that path is shorter than TAPER_RATIO × D(p). Branches
// into a corner or a pointed tip are tapers all the way (the distance grows in proportion to
// the way walked: by sin(θ/2) per pixel for a point of angle θ, so points blunter than
// 2·asin(1/TAPER_RATIO) ≈ 29° are tapers). Every other skeleton pixel is part of a stroke's
// BODY: the stretches of a stroke more than TAPER_RATIO half-widths from its ends, every
// narrowing between wider parts (the path to it from any end first widens, then narrows by
// more than the tolerance), every closed loop around a hole, and needle-thin spikes.
import { squaredDistanceTransform } from './distance'

/** A taper is shorter than this many times the distance to the paper at its pixels. */
export const TAPER_RATIO = 4
/** Pixel noise in the distance along a skeleton branch, px. */
export const RISE_TOLERANCE_PX = 1

// Neighbours in order N, NE, E, SE, S, SW, W, NW (y down).
const NX = [0, 1, 1, 1, 0, -1, -1, -1]
const NY = [-1, -1, 0, 1, 1, 1, 0, -1]

/** For each 8-bit neighbourhood (bit i = neighbour i is ink): 1 if the centre may be removed. */
const REMOVABLE = (() => {
  const table = new Uint8Array(256)
  for (let code = 0; code < 256; code++) {
    const set: number[] = []
    for (let i = 0; i < 8; i++) if (code & (1 << i)) set.push(i)
    if (set.length < 2) continue // an isolated pixel or the end of a line
    if ((code & 0b01010101) === 0b01010101) continue // no paper across an edge: removing it makes a hole
    // 8-connected groups among the ink neighbours (within the 3 × 3 square)
    const group = set.map((_, i) => i)
    const root = (i: number): number => (group[i] === i ? i : (group[i] = root(group[i]!)))
    for (let a = 0; a < set.length; a++) {
      for (let b = a + 1; b < set.length; b++) {
        const i = set[a]!, j = set[b]!
        if (Math.abs(NX[i]! - NX[j]!) <= 1 && Math.abs(NY[i]! - NY[j]!) <= 1) group[root(a)] = root(b)
      }
    }
    let groups = 0
    for (let a = 0; a < set.length; a++) if (root(a) === a) groups++
    if (groups === 1) table[code] = 1
  }
  return table
})()

export interface StrokeSkeleton {
  width: number
  height: number
  /** Bitmap index (y · width + x) of every skeleton pixel. */
  pixels: Int32Array
  /** Squared distance from each skeleton pixel's centre to the nearest paper pixel's centre. */
  d2: Int32Array
  /** 1 where the skeleton pixel belongs to the body of a stroke, 0 in an end taper. */
  body: Uint8Array
  /** Connected part of the skeleton (one per piece of ink) of each skeleton pixel. */
  piece: Int32Array
  pieces: number
  /** Skeleton neighbours of skeleton pixel s: neighbours[first[s]] … neighbours[first[s + 1] − 1]. */
  first: Int32Array
  neighbours: Int32Array
}

/** Thin the ink (1 = ink) to its skeleton; returns the bitmap indices of the skeleton pixels. */
export function skeletonPixels(bitmap: Uint8Array, width: number, height: number, d2: Int32Array): Int32Array {
  // Ink pixels in order of increasing distance to the paper: counting sort on the squared
  // distance (whole numbers), ties in reading order.
  let count = new Int32Array(1024)
  let inkCount = 0
  for (let i = 0; i < d2.length; i++) {
    const k = d2[i]!
    if (k === 0) continue
    if (k >= count.length) {
      const bigger = new Int32Array(Math.max(2 * count.length, k + 1))
      bigger.set(count)
      count = bigger
    }
    count[k]!++
    inkCount++
  }
  const end = new Int32Array(count.length) // where each distance's pixels end, once placed
  for (let k = 1, sum = 0; k < count.length; k++) { end[k] = sum; sum += count[k]! }
  // Positions in a working copy with a one-pixel paper border, so neighbours need no bounds
  // checks: row y, column x is at (y + 1)·W + x + 1.
  const W = width + 2
  const order = new Int32Array(inkCount)
  for (let y = 0, i = 0; y < height; y++) {
    for (let x = 0; x < width; x++, i++) {
      const k = d2[i]!
      if (k) order[end[k]!++] = i + W + 1 + 2 * y
    }
  }
  const work = new Uint8Array(W * (height + 2))
  for (let y = 0; y < height; y++) work.set(bitmap.subarray(y * width, (y + 1) * width), (y + 1) * W + 1)
  const off = NX.map((dx, i) => NY[i]! * W + dx)
  const o0 = off[0]!, o1 = off[1]!, o2 = off[2]!, o3 = off[3]!, o4 = off[4]!, o5 = off[5]!, o6 = off[6]!, o7 = off[7]!
  // Pixels at the same distance are thinned together, from one side at a time (paper to the
  // north, south, east, west in turn), every removable pixel of that side at once: removing
  // them one by one in reading order would eat a two-pixel-wide line from one end. Rounds of
  // the four sides repeat over what is left until nothing more goes. Which sides of a pixel
  // are paper is read once a round, into `state` beside the list (bit 4: still ink), so each
  // side's pass reads the image only where it may remove something.
  const N = 1, S = 2, E = 4, Wst = 8, ALIVE = 16
  const sides: Array<[number, number]> = [[N, o0], [S, o4], [E, o2], [Wst, o6]]
  const state = new Uint8Array(inkCount)
  const doomed = new Int32Array(inkCount)
  let from = 0, kept = 0
  for (let k = 1; k < count.length; k++) {
    if (!count[k]) continue
    let to = end[k]!
    let removed = true
    while (removed) {
      removed = false
      for (let j = from; j < to; j++) {
        const p = order[j]!
        state[j] = ALIVE | (work[p + o0] ? 0 : N) | (work[p + o4] ? 0 : S) | (work[p + o2] ? 0 : E) | (work[p + o6] ? 0 : Wst)
      }
      for (const [bit] of sides) {
        let n = 0
        for (let j = from; j < to; j++) {
          if ((state[j]! & (ALIVE | bit)) !== (ALIVE | bit)) continue
          const p = order[j]!
          const code = work[p + o0]! | (work[p + o1]! << 1) | (work[p + o2]! << 2) | (work[p + o3]! << 3)
            | (work[p + o4]! << 4) | (work[p + o5]! << 5) | (work[p + o6]! << 6) | (work[p + o7]! << 7)
          if (REMOVABLE[code]) doomed[n++] = j
        }
        for (let i = 0; i < n; i++) { const j = doomed[i]!; work[order[j]!] = 0; state[j] = 0 }
        if (n) removed = true
      }
      // keep only what is left of this distance's pixels
      let m = from
      for (let j = from; j < to; j++) if (state[j]) order[m++] = order[j]!
      to = m
    }
    for (let j = from; j < to; j++) order[kept++] = toIndex(order[j]!, W, width) // kept ≤ j
    from = end[k]!
  }
  return order.slice(0, kept)
}

/** Bitmap index of a position in the bordered working copy. */
function toIndex(p: number, W: number, width: number): number {
  const y = ((p / W) | 0) - 1
  return y * width + (p - (y + 1) * W - 1)
}

/** Binary min-heap of (key, value) pairs. */
class MinHeap {
  private keys: Float64Array
  private values: Int32Array
  size = 0
  constructor(capacity: number) {
    this.keys = new Float64Array(Math.max(1, capacity))
    this.values = new Int32Array(Math.max(1, capacity))
  }

  push(key: number, value: number): void {
    if (this.size === this.keys.length) {
      const k = new Float64Array(this.size * 2); k.set(this.keys); this.keys = k
      const v = new Int32Array(this.size * 2); v.set(this.values); this.values = v
    }
    let i = this.size++
    while (i > 0) {
      const parent = (i - 1) >> 1
      if (this.keys[parent]! <= key) break
      this.keys[i] = this.keys[parent]!
      this.values[i] = this.values[parent]!
      i = parent
    }
    this.keys[i] = key
    this.values[i] = value
  }

  /** Removes the smallest pair; returns its value (its key is in lastKey). */
  pop(): number {
    const value = this.values[0]!
    this.lastKey = this.keys[0]!
    const key = this.keys[--this.size]!, v = this.values[this.size]!
    let i = 0
    for (;;) {
      let c = 2 * i + 1
      if (c >= this.size) break
      if (c + 1 < this.size && this.keys[c + 1]! < this.keys[c]!) c++
      if (this.keys[c]! >= key) break
      this.keys[i] = this.keys[c]!
      this.values[i] = this.values[c]!
      i = c
    }
    this.keys[i] = key
    this.values[i] = v
    return value
  }

  lastKey = 0
}

/**
 * The bitmap with every pinhole filled: a paper pixel whose four edge neighbours are ink is
 * read as ink (it is far below any speck filter, and the ink around it is not a narrow ring
 * but the edge of a pixel grid that met a sharp corner). The same array when there is none.
 */
export function fillPinholes(bitmap: Uint8Array, width: number, height: number): Uint8Array {
  let out = bitmap
  for (let y = 1; y < height - 1; y++) {
    const row = y * width
    for (let x = 1; x < width - 1; x++) {
      const i = row + x
      if (bitmap[i] || !bitmap[i - 1] || !bitmap[i + 1] || !bitmap[i - width] || !bitmap[i + width]) continue
      if (out === bitmap) out = bitmap.slice()
      out[i] = 1
    }
  }
  return out
}

/**
 * The skeleton of a bitmap (1 = ink) with its stroke bodies and pieces (see the top of this
 * file for the definitions); pinholes are filled first (fillPinholes).
 */
export function strokeSkeleton(inkBitmap: Uint8Array, width: number, height: number): StrokeSkeleton {
  const bitmap = fillPinholes(inkBitmap, width, height)
  const dist2 = squaredDistanceTransform(bitmap, width, height)
  const pixels = skeletonPixels(bitmap, width, height, dist2)
  const count = pixels.length
  const d2 = new Int32Array(count)
  // From here on dist2 marks the skeleton: skeleton pixel s holds −(s + 1).
  for (let s = 0; s < count; s++) { const i = pixels[s]!; d2[s] = dist2[i]!; dist2[i] = -(s + 1) }

  // Skeleton neighbours of each skeleton pixel, in one flat list.
  const first = new Int32Array(count + 1)
  const list = new Int32Array(8 * count)
  let listed = 0
  for (let s = 0; s < count; s++) {
    first[s] = listed
    const i = pixels[s]!
    const x = i % width, y = (i - x) / width
    for (let k = 0; k < 8; k++) {
      const xx = x + NX[k]!, yy = y + NY[k]!
      if (xx < 0 || yy < 0 || xx >= width || yy >= height) continue
      const t = dist2[yy * width + xx]!
      if (t < 0) list[listed++] = -t - 1
    }
  }
  first[count] = listed
  const nbr = list.slice(0, listed)

  // Pieces: connected parts of the skeleton.
  const piece = new Int32Array(count).fill(-1)
  let pieces = 0
  const stack: number[] = []
  for (let s = 0; s < count; s++) {
    if (piece[s] !== -1) continue
    piece[s] = pieces
    stack.push(s)
    while (stack.length) {
      const a = stack.pop()!
      for (let e = first[a]!; e < first[a + 1]!; e++) {
        const b = nbr[e]!
        if (piece[b] === -1) { piece[b] = pieces; stack.push(b) }
      }
    }
    pieces++
  }

  // End tapers: shortest paths from the ends of the skeleton (pixels with one skeleton
  // neighbour, or none) that keep within RISE_TOLERANCE_PX of their widest point so far.
  const dist = new Float64Array(count).fill(Infinity)
  const rise = new Float64Array(count) // the largest distance to paper met on the way
  const depth = new Float64Array(count)
  for (let s = 0; s < count; s++) depth[s] = Math.sqrt(d2[s]!)
  const heap = new MinHeap(count)
  for (let s = 0; s < count; s++) {
    if (first[s + 1]! - first[s]! <= 1) { dist[s] = 0; rise[s] = depth[s]!; heap.push(0, s) }
  }
  while (heap.size) {
    const a = heap.pop()
    const da = heap.lastKey
    if (da > dist[a]!) continue
    const ia = pixels[a]!
    for (let e = first[a]!; e < first[a + 1]!; e++) {
      const b = nbr[e]!
      if (depth[b]! < rise[a]! - RISE_TOLERANCE_PX) continue
      const step = (pixels[b]! - ia === width || ia - pixels[b]! === width || Math.abs(pixels[b]! - ia) === 1) ? 1 : Math.SQRT2
      const db = da + step
      if (db < dist[b]!) {
        dist[b] = db
        rise[b] = Math.max(rise[a]!, depth[b]!)
        heap.push(db, b)
      }
    }
  }
  const body = new Uint8Array(count)
  for (let s = 0; s < count; s++) if (dist[s]! >= TAPER_RATIO * depth[s]!) body[s] = 1
  return { width, height, pixels, d2, body, piece, pieces, first, neighbours: nbr }
}
