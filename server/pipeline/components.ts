// Pieces of ink in a 1-bit bitmap: connected sets of ink pixels (8-neighbourhood: pixels that
// touch at a corner belong together, as they do in the traced outline), with their area and
// bounding box. Linear in the pixel count: the ink is read as runs along each row, a run joins
// the runs of the row above that it touches (union-find over runs), then each run's pixels get
// their piece's number. Pieces are numbered in the order of their first pixel in reading order.

export interface Piece {
  /** Ink pixels. */
  area: number
  x0: number
  y0: number
  /** Inclusive. */
  x1: number
  y1: number
}

export interface Pieces {
  pieces: Piece[]
  /** Piece index + 1 for every ink pixel, 0 for paper. */
  labels: Int32Array
}

export function findPieces(bitmap: Uint8Array, width: number, height: number): Pieces {
  const labels = new Int32Array(width * height)
  const pieces = piecesOf(bitmap, width, height, labels)
  return { pieces, labels }
}

/**
 * The pieces alone (as findPieces), without a label for every pixel: for their boxes and areas,
 * in a fraction of the memory. With `labels`, fills it as findPieces does.
 */
export function piecesOf(bitmap: Uint8Array, width: number, height: number, labels?: Int32Array): Piece[] {
  if (bitmap.length !== width * height) throw new RangeError('Bitmap size does not match width × height.')
  // Runs of ink: row, first and last column; parent for the union-find (a root is the
  // earliest run of its piece, so roots come in the order of the pieces' first pixels).
  let cap = 1024
  let runY = new Int32Array(cap), runX0 = new Int32Array(cap), runX1 = new Int32Array(cap), parent = new Int32Array(cap)
  let runs = 0
  const root = (r: number) => {
    while (parent[r] !== r) { const g = parent[parent[r]!]!; parent[r] = g; r = g }
    return r
  }
  let prevStart = 0, prevEnd = 0 // runs of the row above: [prevStart, prevEnd)
  for (let y = 0; y < height; y++) {
    const row = y * width
    const rowStart = runs
    let k = prevStart
    let x = 0
    while (x < width) {
      if (!bitmap[row + x]) { x++; continue }
      const x0 = x
      while (x < width && bitmap[row + x]) x++
      const x1 = x - 1
      if (runs === cap) {
        cap *= 2
        const grow = (a: Int32Array) => { const b = new Int32Array(cap); b.set(a); return b }
        runY = grow(runY); runX0 = grow(runX0); runX1 = grow(runX1); parent = grow(parent)
      }
      const r = runs++
      runY[r] = y; runX0[r] = x0; runX1[r] = x1; parent[r] = r
      // runs above that end before this one's left neighbour cannot touch it or any later run
      while (k < prevEnd && runX1[k]! < x0 - 1) k++
      for (let j = k; j < prevEnd && runX0[j]! <= x1 + 1; j++) {
        const a = root(j), b = root(r)
        if (a < b) parent[b] = a
        else if (b < a) parent[a] = b
      }
    }
    prevStart = rowStart
    prevEnd = runs
  }
  const pieces: Piece[] = []
  const id = new Int32Array(runs)
  for (let r = 0; r < runs; r++) {
    const q = root(r)
    let p: Piece
    if (q === r) {
      pieces.push(p = { area: 0, x0: width, y0: height, x1: -1, y1: -1 })
      id[r] = pieces.length
    } else {
      id[r] = id[q]!
      p = pieces[id[r]! - 1]!
    }
    const y = runY[r]!, x0 = runX0[r]!, x1 = runX1[r]!
    p.area += x1 - x0 + 1
    if (x0 < p.x0) p.x0 = x0
    if (x1 > p.x1) p.x1 = x1
    if (y < p.y0) p.y0 = y
    if (y > p.y1) p.y1 = y
    labels?.fill(id[r]!, y * width + x0, y * width + x1 + 1)
  }
  return pieces
}

export interface Box { x0: number, y0: number, x1: number, y1: number }

/** Bounding box (inclusive) of the pieces of at least minArea pixels; null when there are none. */
export function inkBox(pieces: readonly Piece[], minArea: number): Box | null {
  let box: Box | null = null
  for (const p of pieces) {
    if (p.area < minArea) continue
    if (!box) box = { x0: p.x0, y0: p.y0, x1: p.x1, y1: p.y1 }
    else {
      box.x0 = Math.min(box.x0, p.x0); box.y0 = Math.min(box.y0, p.y0)
      box.x1 = Math.max(box.x1, p.x1); box.y1 = Math.max(box.y1, p.y1)
    }
  }
  return box
}

/** Clear, in place, every piece smaller than minArea pixels. */
export function dropSmallPieces(bitmap: Uint8Array, found: Pieces, minArea: number): void {
  const { pieces, labels } = found
  for (let i = 0; i < bitmap.length; i++) {
    const l = labels[i]!
    if (l && pieces[l - 1]!.area < minArea) bitmap[i] = 0
  }
}
