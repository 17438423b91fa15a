// The first stage of tracing: the bitmap decomposed into closed boundary paths, one per edge
// between ink and paper (P. Selinger, "Potrace: a polygon-based tracing algorithm", 2003, §2.1),
// step for step as the npm potrace port does it (its Potrace#_bmToPathlist, version 2.1.8), so
// that the port's second stage (_processPath) gets the very paths it would have made itself.
// Three differences, none in the result except the first:
//  - outside the image is paper (the port read the pixel past the right edge as the first pixel
//    of the next row, which made phantom slivers where ink touched the left edge);
//  - the working copy is a typed array with a paper border wide enough for every look-up,
//    instead of a bitmap object read through bounds-checked methods;
//  - a path's points become objects only when the path is kept (larger than the speck filter),
//    so a noisy bitmap's thousands of specks cost no garbage.
// Paths are handed over one at a time, in the order found, so the caller can stop early.
import { createRequire } from 'node:module'

const require = createRequire(import.meta.url)

export interface PortPoint { x: number, y: number }
/** A boundary path as the port's second stage reads it (potrace/lib/types/Path.js). */
export interface PortPath {
  pt: PortPoint[]
  len: number
  area: number
  sign: '+' | '-'
  minX: number
  minY: number
  maxX: number
  maxY: number
}

const PortPathClass = require('potrace/lib/types/Path.js') as new () => PortPath
const PortPointClass = require('potrace/lib/types/Point.js') as new (x: number, y: number) => PortPoint

/** Paper around the image in the working copy: the turn policy looks up to 4 pixels away. */
const BORDER = 5

/**
 * Decompose a bitmap (1 = ink) into boundary paths; calls keep(path) for every path enclosing
 * more than turdSize pixels, in the order the scan finds them. The path's sign is that of the
 * pixel it starts at ('+' ink: an outer boundary; '-' paper: a hole). Turn policy: minority.
 */
export function decompose(bitmap: Uint8Array, width: number, height: number, turdSize: number, keep: (path: PortPath) => void): void {
  const W = width + 2 * BORDER
  // (a whole number of 32-bit words, so the scan below can skip paper four pixels at a time)
  const work = new Uint8Array((W * (height + 2 * BORDER) + 3) & ~3)
  const words = new Uint32Array(work.buffer)
  for (let y = 0; y < height; y++) work.set(bitmap.subarray(y * width, (y + 1) * width), (y + BORDER) * W + BORDER)
  // Pixel (x, y) of the image is work[at(x, y)]; path points are pixel corners: point (x, y)
  // is the top-left corner of pixel (x, y).
  const origin = BORDER * W + BORDER
  const at = (x: number, y: number) => origin + y * W + x

  // Whether the ink is in the majority around corner (x, y), looking at rings of 2 to 4 pixels:
  // the port's majority(), on the working copy.
  const majority = (x: number, y: number): boolean => {
    for (let i = 2; i < 5; i++) {
      let ct = 0
      for (let a = -i + 1; a <= i - 1; a++) {
        ct += work[at(x + a, y + i - 1)] ? 1 : -1
        ct += work[at(x + i - 1, y + a - 1)] ? 1 : -1
        ct += work[at(x + a - 1, y - i)] ? 1 : -1
        ct += work[at(x - i, y + a)] ? 1 : -1
      }
      if (ct > 0) return true
      if (ct < 0) return false
    }
    return false
  }

  let xs = new Int32Array(1024)
  let ys = new Int32Array(1024)
  for (let y = 0; y < height; y++) {
    let x = 0
    for (;;) {
      // the next ink pixel of the working copy in reading order
      const rowStart = at(0, y)
      let i = rowStart + x
      const rowEnd = rowStart + width
      while (i < rowEnd && (i & 3) && work[i] !== 1) i++
      while (i + 4 <= rowEnd && words[i >> 2] === 0) i += 4
      while (i < rowEnd && work[i] !== 1) i++
      if (i === rowEnd) break
      x = i - rowStart
      const x0 = x, y0 = y
      const sign = bitmap[y0 * width + x0] ? '+' : '-'

      // Walk the boundary from the pixel's top-left corner, first downwards, ink on the left.
      let px = x0, py = y0, dx = 0, dy = 1, len = 0, area = 0
      let minX = x0, maxX = x0, minY = y0, maxY = y0
      for (;;) {
        if (len === xs.length) {
          const nx = new Int32Array(len * 2); nx.set(xs); xs = nx
          const ny = new Int32Array(len * 2); ny.set(ys); ys = ny
        }
        xs[len] = px
        ys[len] = py
        len++
        if (px > maxX) maxX = px
        if (px < minX) minX = px
        if (py > maxY) maxY = py
        if (py < minY) minY = py
        px += dx
        py += dy
        area -= px * dy
        if (px === x0 && py === y0) break
        const l = work[at(px + ((dx + dy - 1) >> 1), py + ((dy - dx - 1) >> 1))]
        const r = work[at(px + ((dx - dy - 1) >> 1), py + ((dy + dx - 1) >> 1))]
        let t: number
        if (r && !l) {
          // an ambiguous corner: turn right where the ink is in the minority around it
          if (!majority(px, py)) { t = dx; dx = -dy; dy = t } else { t = dx; dx = dy; dy = -t }
        } else if (r) {
          t = dx; dx = -dy; dy = t
        } else if (!l) {
          t = dx; dx = dy; dy = -t
        }
      }

      // Invert the inside of the path in the working copy (the port's xorPath).
      let y1 = ys[0]!
      for (let k = 1; k < len; k++) {
        const yk = ys[k]!
        if (yk !== y1) {
          const row = at(0, yk < y1 ? yk : y1)
          for (let j = xs[k]!; j < maxX; j++) work[row + j]! ^= 1
          y1 = yk
        }
      }

      if (area > turdSize) {
        const path = new PortPathClass()
        const pt = new Array<PortPoint>(len)
        for (let k = 0; k < len; k++) pt[k] = new PortPointClass(xs[k]!, ys[k]!)
        keep(Object.assign(path, { pt, len, area, sign, minX, maxX, minY, maxY }))
      }
    }
  }
}
