// Thin strokes made weedable: ink thickened where, and only where, it is narrower than a width.
//
// Every skeleton pixel in the body of a stroke (skeleton.ts) whose stroke is narrower than the
// asked width becomes the centre of a disc of ink of that width; so does the deepest pixel of a
// compact piece (a dot) narrower than it. The result is the ink together with those discs:
// a thin line becomes a line of the asked width with round ends, a dot a disc of that
// diameter, while wider strokes and large shapes keep every pixel as it was (their corners
// are end tapers, not stroke bodies, so they are not rounded off). Ink is only ever added.
// The discs are found with one more distance transform, from the disc centres, so the time is
// linear in the pixels whatever the width. A thickened stroke that passes close to other ink
// can leave a new narrow place between them, so the result is measured again and thickened
// again where needed, a few rounds at most. Ink closer to the image's edge than half the width
// cannot grow past the edge: a stroke running along it stays as wide as there is room for.
import { squaredDistanceTransform } from './distance'
import { blobWidthPx, strokeWidthPx } from './geometry'
import { strokeSkeleton } from './skeleton'

export interface ThickenOptions {
  /**
   * Leave pieces of ink of at most this many pixels as they are (the speck filter, px², so that
   * specks the tracer would drop are not first blown up into discs). Default 0.
   */
  speckAreaPx?: number
}

/**
 * The bitmap (1 = ink, row-major, width × height) with every stroke and dot narrower than
 * minWidthPx pixels thickened to at least that width, as measured by narrowestFeature. Returns
 * a new array; the input is not changed.
 */
export function thickenStrokes(bitmap: Uint8Array, width: number, height: number, minWidthPx: number, options: ThickenOptions = {}): Uint8Array {
  if (bitmap.length !== width * height) throw new RangeError('Bitmap size does not match width × height.')
  if (!(minWidthPx >= 0)) throw new RangeError('The width to thicken to must be a number of pixels, at least 0.')
  let out = bitmap
  for (let round = 0; round < MAX_ROUNDS; round++) {
    const next = thickenOnce(out, width, height, minWidthPx, options)
    if (!next) break
    out = next.bitmap
    // only narrow places against the image's edge were left: another round cannot widen them
    if (!next.awayFromEdge) break
  }
  return out === bitmap ? bitmap.slice() : out
}

/** Rounds of thickening at most (each only adds ink; a third rarely finds anything). */
const MAX_ROUNDS = 3

/**
 * One round: the thickened bitmap, and whether any disc lay wholly inside the image (if not,
 * another round has nothing it could change); null when nothing is narrower than minWidthPx.
 */
function thickenOnce(bitmap: Uint8Array, width: number, height: number, minWidthPx: number, options: ThickenOptions): { bitmap: Uint8Array, awayFromEdge: boolean } | null {
  if (minWidthPx <= 1) return null
  const sk = strokeSkeleton(bitmap, width, height)
  const count = sk.pixels.length

  // Disc centres: the skeleton pixels of thin strokes — thin body pixels, then the tapers
  // that run on from them while they stay thin (the tips of thin strokes, not the corners of
  // wide shapes, which run on from wide bodies) — and every skeleton pixel of a thin piece
  // without a body (a dot, a dash).
  const thin = (s: number) => strokeWidthPx(sk.d2[s]!) < minWidthPx
  const centre = new Uint8Array(count)
  const stack: number[] = []
  const deepest = new Int32Array(sk.pieces).fill(-1)
  const hasBody = new Uint8Array(sk.pieces)
  for (let s = 0; s < count; s++) {
    const p = sk.piece[s]!
    if (sk.body[s]) {
      hasBody[p] = 1
      if (thin(s)) { centre[s] = 1; stack.push(s) }
    }
    if (deepest[p] === -1 || sk.d2[s]! > sk.d2[deepest[p]!]!) deepest[p] = s
  }
  while (stack.length) {
    const a = stack.pop()!
    for (let e = sk.first[a]!; e < sk.first[a + 1]!; e++) {
      const b = sk.neighbours[e]!
      if (!centre[b] && !sk.body[b] && thin(b)) { centre[b] = 1; stack.push(b) }
    }
  }
  const speck = options.speckAreaPx ?? 0
  const thinPiece = new Uint8Array(sk.pieces)
  for (let p = 0; p < sk.pieces; p++) {
    const s = deepest[p]!
    if (hasBody[p] || blobWidthPx(sk.d2[s]!) >= minWidthPx) continue
    if (speck > 0 && pieceArea(bitmap, width, height, sk.pixels[s]!, speck) <= speck) continue
    thinPiece[p] = 1
  }
  const centres: number[] = []
  for (let s = 0; s < count; s++) if (centre[s] || thinPiece[sk.piece[s]!]) centres.push(sk.pixels[s]!)
  if (centres.length === 0) return null

  // Pixels whose centre lies within the disc radius of a centre's: a distance transform from
  // the centres, on a frame wide enough that the image's outside is never within reach. The
  // radius is half the width plus half a pixel, so that the thickened stroke's own narrowest
  // reading (strokeWidthPx: twice the distance to paper less half a pixel) reaches the width.
  const radius = minWidthPx / 2 + 0.5
  const pad = Math.ceil(radius) + 1
  const W = width + 2 * pad, H = height + 2 * pad
  const field = new Uint8Array(W * H).fill(1)
  let awayFromEdge = false
  for (const i of centres) {
    const x = i % width, y = (i - x) / width
    field[(y + pad) * W + x + pad] = 0
    if (Math.min(x + 0.5, y + 0.5, width - x - 0.5, height - y - 0.5) >= radius) awayFromEdge = true
  }
  const d2 = squaredDistanceTransform(field, W, H)
  const r2 = radius * radius
  const out = bitmap.slice()
  for (let y = 0; y < height; y++) {
    for (let x = 0, i = y * width, j = (y + pad) * W + pad; x < width; x++, i++, j++) {
      if (d2[j]! <= r2) out[i] = 1
    }
  }
  return { bitmap: out, awayFromEdge }
}

/** Pixels in the 8-connected piece of ink at `start`, counted up to just past `limit`. */
function pieceArea(bitmap: Uint8Array, width: number, height: number, start: number, limit: number): number {
  const seen = new Set<number>([start])
  const stack = [start]
  while (stack.length && seen.size <= limit) {
    const i = stack.pop()!
    const x = i % width, y = (i - x) / width
    for (let dy = -1; dy <= 1; dy++) {
      for (let dx = -1; dx <= 1; dx++) {
        const xx = x + dx, yy = y + dy
        if (xx < 0 || yy < 0 || xx >= width || yy >= height) continue
        const j = yy * width + xx
        if (bitmap[j] && !seen.has(j)) { seen.add(j); stack.push(j) }
      }
    }
  }
  return seen.size
}
