// Curves as one Float64Array, for crossing into the cut sheets' worker thread. A 3,500-node
// drawing is some 14,000 small objects; copying them across the thread boundary (the
// structured clone) costs the server's event loop tens of milliseconds on a busy machine,
// while a typed array's buffer is handed over (transferred) without a copy.
//
// Layout: curve count, then per curve its segment count, then per segment a kind (0 line,
// 1 cubic) followed by its points' x and y: from, to for a line; from, c1, c2, to for a cubic.
import type { CutCurve, Segment } from './path'

const LINE = 0
const CUBIC = 1

export function packCurves(curves: CutCurve[]): Float64Array {
  let n = 1
  for (const c of curves) {
    n += 1
    for (const s of c.segments) n += s.kind === 'line' ? 5 : 9
  }
  const out = new Float64Array(n)
  let i = 0
  out[i++] = curves.length
  for (const c of curves) {
    out[i++] = c.segments.length
    for (const s of c.segments) {
      if (s.kind === 'line') {
        out[i++] = LINE
        out[i++] = s.from.x; out[i++] = s.from.y; out[i++] = s.to.x; out[i++] = s.to.y
      } else {
        out[i++] = CUBIC
        out[i++] = s.from.x; out[i++] = s.from.y; out[i++] = s.c1.x; out[i++] = s.c1.y
        out[i++] = s.c2.x; out[i++] = s.c2.y; out[i++] = s.to.x; out[i++] = s.to.y
      }
    }
  }
  return out
}

export function unpackCurves(data: Float64Array): CutCurve[] {
  let i = 0
  const take = () => {
    if (i >= data.length) throw new RangeError('The packed curves end early.')
    return data[i++]!
  }
  const point = () => ({ x: take(), y: take() })
  const count = take()
  const curves: CutCurve[] = []
  for (let c = 0; c < count; c++) {
    const n = take()
    const segments: Segment[] = []
    for (let k = 0; k < n; k++) {
      const kind = take()
      if (kind === LINE) segments.push({ kind: 'line', from: point(), to: point() })
      else if (kind === CUBIC) segments.push({ kind: 'cubic', from: point(), c1: point(), c2: point(), to: point() })
      else throw new RangeError(`Unknown segment kind ${kind} in the packed curves.`)
    }
    curves.push({ segments })
  }
  if (i !== data.length) throw new RangeError('The packed curves have data left over.')
  return curves
}
