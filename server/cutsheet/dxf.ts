// The cut sheet as DXF (Release 12, text): the same geometry as the SVG, sheet by sheet.
//
// Layout of a file (group code, then value, one per line, CR LF line ends as DOS-era R12
// files have them; readers accept either):
//   HEADER   $ACADVER AC1009 (the R11/R12 drawing version), $INSUNITS 4 (millimetres),
//            $EXTMIN / $EXTMAX the sheet's corners;
//   ENTITIES one closed POLYLINE (70 = 1) with its VERTEX entities and a SEQEND for every
//            closed curve of every copy (layer DW_CUT) and every weeding frame (layer DW_FRAME);
//   EOF.
// No TABLES section: R12 readers create the layers the entities name.
// Sources: "Drawing Interchange and File Formats, Release 12" (the R12 DXF reference: section
// and entity structure, POLYLINE 66/70, VERTEX, SEQEND); the AutoCAD DXF reference's header
// table ($ACADVER: AC1009 = R11 and R12) and POLYLINE group codes (70 bit 1 = closed). $INSUNITS
// is a later header variable (the INSUNITS system variable: 4 = millimetres; written with group
// code 70, from memory); a reader that does not know it skips it, and the numbers are mm anyway.
//
// Curves: DXF R12 has no Bézier entity, so each cubic is flattened into chords within
// FLATTEN_TOLERANCE_MM (0.05 mm, both ways; see path.ts for the bound) in the copy's own
// coordinates, then placed by the same transform as in the SVG (a rigid motion, so the
// tolerance holds on the sheet). Vertices are then put on the 0.01 mm grid, which moves each
// by at most 0.005·√2 ≈ 0.007 mm more.
//
// Y axis: SVG's y runs down the page, DXF's (like every CAD drawing) runs up. Every point is
// written as (x, sheetHeight − y), so the drawing reads the same way up in both files and the
// sheet occupies 0…W × 0…H in either.
import { FLATTEN_TOLERANCE_MM, flattenCurve, formatMm, round2, type CutCurve, type Point } from './path'
import { apply, placeCopies, type CutSheetInput, type Rect } from './place'

export const DXF_CUT_LAYER = 'DW_CUT'
export const DXF_FRAME_LAYER = 'DW_FRAME'

export interface CutSheetDxfInput extends CutSheetInput {
  /** Chord tolerance for the curves, mm (default 0.05). */
  toleranceMm?: number
}

const EOL = '\r\n'

function roundCurve(c: CutCurve): CutCurve {
  const p = (q: Point): Point => ({ x: round2(q.x), y: round2(q.y) })
  return {
    segments: c.segments.map((s) => s.kind === 'line'
      ? { kind: 'line', from: p(s.from), to: p(s.to) }
      : { kind: 'cubic', from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) }),
  }
}

/** The vertices on the 0.01 mm grid, without repeats (nor a last vertex equal to the first). */
function gridPolygon(points: Point[]): Point[] {
  const out: Point[] = []
  for (const q of points) {
    const r = { x: round2(q.x), y: round2(q.y) }
    const last = out[out.length - 1]
    if (!last || last.x !== r.x || last.y !== r.y) out.push(r)
  }
  while (out.length > 1 && out[0]!.x === out[out.length - 1]!.x && out[0]!.y === out[out.length - 1]!.y) out.pop()
  return out
}

function polyline(lines: string[], layer: string, points: Point[]): void {
  const g = (code: number, value: string | number) => { lines.push(String(code), String(value)) }
  g(0, 'POLYLINE'); g(8, layer); g(66, 1); g(10, 0); g(20, 0); g(30, 0); g(70, 1)
  for (const p of points) {
    g(0, 'VERTEX'); g(8, layer); g(10, formatMm(p.x)); g(20, formatMm(p.y)); g(30, 0)
  }
  g(0, 'SEQEND'); g(8, layer)
}

function rectPoints(r: Rect): Point[] {
  return [
    { x: r.x, y: r.y }, { x: r.x + r.width, y: r.y },
    { x: r.x + r.width, y: r.y + r.height }, { x: r.x, y: r.y + r.height },
  ]
}

/** One DXF R12 document per sheet, in sheet order (the same sheets as cutSheetSvg). */
export function cutSheetDxf(input: CutSheetDxfInput): string[] {
  const tolerance = input.toleranceMm ?? FLATTEN_TOLERANCE_MM
  const sheets = placeCopies(input)
  const H = input.sheetHeightMm
  // Flattened once, in the copy's own coordinates, from the same 0.01 mm curves the SVG writes.
  const polygons = input.curves.map((c) => flattenCurve(roundCurve(c), tolerance))
  const up = (p: Point): Point => ({ x: p.x, y: H - p.y })
  return sheets.map((sheet) => {
    const lines: string[] = []
    const g = (code: number, value: string | number) => { lines.push(String(code), String(value)) }
    g(0, 'SECTION'); g(2, 'HEADER')
    g(9, '$ACADVER'); g(1, 'AC1009')
    g(9, '$INSUNITS'); g(70, 4)
    g(9, '$EXTMIN'); g(10, 0); g(20, 0); g(30, 0)
    g(9, '$EXTMAX'); g(10, formatMm(input.sheetWidthMm)); g(20, formatMm(H)); g(30, 0)
    g(0, 'ENDSEC')
    g(0, 'SECTION'); g(2, 'ENTITIES')
    for (const copy of sheet.copies) {
      for (const poly of polygons) polyline(lines, DXF_CUT_LAYER, gridPolygon(poly.map((p) => up(apply(copy.transform, p)))))
      if (copy.frame) polyline(lines, DXF_FRAME_LAYER, gridPolygon(rectPoints(copy.frame).map(up)))
    }
    g(0, 'ENDSEC')
    g(0, 'EOF')
    return lines.join(EOL) + EOL
  })
}
