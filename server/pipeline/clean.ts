// The clean vector: the outline at its physical size as a compact SVG in millimetres.
//
//  - root width/height in mm and a viewBox in mm, so one user unit is one millimetre
//    (SVG 1.1, §7 coordinate systems: width/height with unit identifiers; viewBox mapping);
//  - every coordinate converted px → mm and rounded to 0.01 mm before optimisation;
//  - one path, fill-rule evenodd, black fill;
//  - svgo (preset-default, multipass) with path numbers kept to 0.001 (so the 0.01 mm grid
//    survives the switch to relative coordinates), no arcs made from curves (they would move
//    the outline by up to half a percent of a radius), and no conversion of the mm sizes to
//    px. svgo 4's preset-default has neither removeViewBox nor removeDimensions, so viewBox,
//    width and height stay (checked in clean.test.ts).
//  - deterministic: no ids, dates or randomness; the same outline gives the same bytes.
import { optimize, type Config } from 'svgo'
import { DEFAULT_NODE_CAP, TooComplexError } from './errors'
import { curvesToPathData, type ClosedCurve, type Outline } from './trace'

export interface CleanVector {
  svg: string
  widthMm: number
  heightMm: number
  nodeCount: number
  /** Path data in mm before svgo (absolute, 0.01 mm grid). */
  pathDataMm: string
  /** Curves in mm, rounded to the 0.01 mm grid (what the path data says). */
  curvesMm: ClosedCurve[]
  timings: { cleanMs: number, svgoMs: number }
}

/** Round to 0.01 and print without trailing zeros ("-0" printed as "0"). */
export function formatMm(v: number): string {
  const r = Math.round(v * 100) / 100
  if (Object.is(r, -0) || r === 0) return '0'
  return r.toFixed(2).replace(/0+$/, '').replace(/\.$/, '')
}

const round2 = (v: number) => {
  const r = Math.round(v * 100) / 100
  return r === 0 ? 0 : r
}

export function curvesToMm(curves: ClosedCurve[], pxPerMm: number): ClosedCurve[] {
  const k = 1 / pxPerMm
  const p = (pt: { x: number, y: number }) => ({ x: round2(pt.x * k), y: round2(pt.y * k) })
  return curves.map((c) => ({
    sign: c.sign,
    segments: c.segments.map((s) => s.kind === 'line'
      ? { kind: 'line' as const, from: p(s.from), to: p(s.to) }
      : { kind: 'cubic' as const, from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) }),
  }))
}

export const SVGO_CONFIG: Config = {
  multipass: true,
  plugins: [
    {
      name: 'preset-default',
      params: {
        overrides: {
          convertPathData: { floatPrecision: 3, makeArcs: false as unknown as undefined },
          cleanupNumericValues: { floatPrecision: 3, convertToPx: false },
        },
      },
    },
  ],
}

export function cleanVector(outline: Pick<Outline, 'curves' | 'width' | 'height' | 'pxPerMm'>, options: { nodeCap?: number } = {}): CleanVector {
  const t0 = performance.now()
  const nodeCap = options.nodeCap ?? DEFAULT_NODE_CAP
  let nodes = 0
  for (const c of outline.curves) nodes += c.segments.length
  // Before svgo: on a huge path it takes seconds and a lot of memory.
  if (nodes > nodeCap) throw new TooComplexError(nodes, nodeCap)

  const widthMm = outline.width / outline.pxPerMm
  const heightMm = outline.height / outline.pxPerMm
  const curvesMm = curvesToMm(outline.curves, outline.pxPerMm)
  const pathDataMm = curvesToPathData(curvesMm, 2)
  const w = formatMm(widthMm), h = formatMm(heightMm)
  const raw = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}mm" height="${h}mm" viewBox="0 0 ${w} ${h}">`
    + (pathDataMm ? `<path d="${pathDataMm}" fill="#000" fill-rule="evenodd"/>` : '')
    + '</svg>'
  const t1 = performance.now()
  const svg = optimize(raw, SVGO_CONFIG).data + '\n'
  const t2 = performance.now()
  return {
    svg, widthMm: Number(w), heightMm: Number(h), nodeCount: nodes, pathDataMm, curvesMm,
    timings: { cleanMs: t2 - t0, svgoMs: t2 - t1 },
  }
}
