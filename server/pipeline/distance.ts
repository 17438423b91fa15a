// Exact Euclidean distance transform of a 1-bit bitmap, in time linear in its pixels.
//
// P. F. Felzenszwalb and D. P. Huttenlocher, "Distance Transforms of Sampled Functions",
// Theory of Computing 8 (2012) 415–428: the squared Euclidean distance transform is separable;
// each 1-D pass is the lower envelope of parabolas (x − q)² + f(q), exact. The first pass (down
// the columns) only needs the distance to the nearest paper pixel in the column, which a sweep
// down and a sweep up the rows give; the second runs the lower envelope along each row, right
// after the sweep up has finished that row, so the row is still at hand. Along a row only the
// runs of ink need it: a paper pixel is its own nearest paper, and for an ink pixel the paper
// pixels that bound its run are nearer than anything beyond them.
//
// Distances are between pixel centres; everything outside the image counts as paper.

/**
 * Squared distance from each pixel's centre to the nearest paper pixel's centre (0 on paper),
 * for a row-major bitmap with 1 = ink. Exact integers.
 */
export function squaredDistanceTransform(bitmap: Uint8Array, width: number, height: number): Int32Array {
  if (bitmap.length !== width * height) throw new RangeError('Bitmap size does not match width × height.')
  const out = new Int32Array(width * height)
  // Sweep down: rows to the nearest paper pixel above, in the same column (the row above the
  // image is paper).
  for (let x = 0; x < width; x++) out[x] = bitmap[x] ? 1 : 0
  for (let i = width; i < out.length; i++) if (bitmap[i]) out[i] = out[i - width]! + 1
  // Sweep up: g, the rows to the nearest paper pixel above or below; then each row's envelope.
  const g = new Int32Array(width) // this row's g; before that, the row below's (0 below the image)
  const site = new Int32Array(width + 2) // envelope: positions of its parabolas,
  const siteF = new Float64Array(width + 2) // their heights g²,
  const z = new Float64Array(width + 3) // and where each one starts to be the lowest
  for (let y = height - 1; y >= 0; y--) {
    const row = y * width
    let x = 0
    while (x < width) {
      if (!bitmap[row + x]) { g[x] = 0; x++; continue }
      const a = x
      for (; x < width && bitmap[row + x]; x++) {
        const below = g[x]! + 1, above = out[row + x]!
        g[x] = below < above ? below : above
      }
      const b = x - 1
      // parabolas of the run's pixels, between the paper pixels at a − 1 and b + 1
      let k = 0
      site[0] = a - 1
      siteF[0] = 0
      z[0] = -Infinity
      z[1] = Infinity
      for (let q = a; q <= b + 1; q++) {
        const gq = q <= b ? g[q]! : 0
        const fq = gq * gq + q * q
        let s = 0
        for (;;) {
          const v = site[k]!
          s = (fq - (siteF[k]! + v * v)) / (2 * (q - v))
          if (s > z[k]!) break
          k-- // z[0] = −∞ stops this at k = 0
        }
        k++
        site[k] = q
        siteF[k] = gq * gq
        z[k] = s
        z[k + 1] = Infinity
      }
      k = 0
      for (let q = a; q <= b; q++) {
        while (z[k + 1]! < q) k++
        const d = q - site[k]!
        out[row + q] = d * d + siteF[k]!
      }
    }
  }
  return out
}

/** Euclidean distance from each pixel's centre to the nearest paper pixel's centre (0 on paper). */
export function distanceTransform(bitmap: Uint8Array, width: number, height: number): Float64Array {
  const d2 = squaredDistanceTransform(bitmap, width, height)
  const out = new Float64Array(d2.length)
  for (let i = 0; i < d2.length; i++) out[i] = Math.sqrt(d2[i]!)
  return out
}
