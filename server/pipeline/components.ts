// Pieces of ink in a 1-bit bitmap: connected sets of ink pixels (8-neighbourhood: pixels that
// touch at a corner belong together, as they do in the traced outline), with their area and
// bounding box. One pass over the image with an explicit stack: linear in the pixel count.

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
  const pieces: Piece[] = []
  let stack = new Int32Array(1024)
  for (let start = 0; start < bitmap.length; start++) {
    if (!bitmap[start] || labels[start]) continue
    const id = pieces.length + 1
    const p: Piece = { area: 0, x0: width, y0: height, x1: -1, y1: -1 }
    let top = 0
    stack[top++] = start
    labels[start] = id
    while (top > 0) {
      const i = stack[--top]!
      const x = i % width, y = (i - x) / width
      p.area++
      if (x < p.x0) p.x0 = x
      if (x > p.x1) p.x1 = x
      if (y < p.y0) p.y0 = y
      if (y > p.y1) p.y1 = y
      for (let dy = -1; dy <= 1; dy++) {
        const yy = y + dy
        if (yy < 0 || yy >= height) continue
        for (let dx = -1; dx <= 1; dx++) {
          const xx = x + dx
          if (xx < 0 || xx >= width) continue
          const j = yy * width + xx
          if (bitmap[j] && !labels[j]) {
            labels[j] = id
            if (top === stack.length) { const s = new Int32Array(stack.length * 2); s.set(stack); stack = s }
            stack[top++] = j
          }
        }
      }
    }
    pieces.push(p)
  }
  return { pieces, labels }
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
