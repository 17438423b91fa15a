// The cut sheet as DXF (Release 12, text): the same geometry as the SVG, sheet by sheet.
//
// Layout of a file (group code, then value, one per line, CR LF line ends as DOS-era R12
// files have them; readers accept either):
//   HEADER   $ACADVER AC1009 (the R11/R12 drawing version), $INSUNITS 4 (millimetres),
//            $EXTMIN / $EXTMAX the sheet's corners;
//   ENTITIES in cutting order: label TEXT (layer DW_LABEL: to be marked, not cut), weeding
//            lines as LINE entities (DW_WEED), one closed POLYLINE (70 = 1) with its VERTEX
//            entities and a SEQEND for every closed outline of every copy (DW_CUT), and every
//            weeding frame (DW_FRAME);
//   EOF.
// No TABLES section: R12 readers create the layers the entities name. Copies are written out
// in full, outline by outline (no blocks), so every reader sees plain polylines.
// Sources: "Drawing Interchange and File Formats, Release 12" (the R12 DXF reference: section
// and entity structure, POLYLINE 66/70, VERTEX, SEQEND, LINE 10/20/11/21, TEXT 10/20/40/1/50
// and 72 = 5 "fit" between the 10/20 and 11/21 points); the AutoCAD DXF reference's header
// table ($ACADVER: AC1009 = R11 and R12) and POLYLINE group codes (70 bit 1 = closed).
// $INSUNITS is a later header variable (the INSUNITS system variable: 4 = millimetres; written
// with group code 70, from memory); a reader that does not know it skips it, and the numbers
// are mm anyway.
//
// Curves: DXF R12 has no Bézier entity, so each cubic is flattened into chords within
// FLATTEN_TOLERANCE_MM (0.05 mm, both ways; see path.ts for the bound) in the design's own
// coordinates, with vertices on the 0.01 mm grid (design.ts), then placed by the same
// transform as in the SVG. The transforms are rigid motions with whole-hundredth translations,
// so every placed vertex is again exactly on the grid: the numbers are computed in integer
// hundredths, which also keeps a 200-copy sheet quick to write.
//
// Y axis: SVG's y runs down the page, DXF's (like every CAD drawing) runs up. Every point is
// written as (x, sheetHeight − y), so the drawing reads the same way up in both files and the
// sheet occupies 0…W × 0…H in either.
import { FLATTEN_TOLERANCE_MM, formatMm, type Point } from './path'
import { jobSheetPlans, type Affine, type CutSheetInput, type Rect } from './place'
import type { SheetPlan } from './plan'
import { HAIRLINE_MM } from './svg'

export const DXF_CUT_LAYER = 'DW_CUT'
export const DXF_FRAME_LAYER = 'DW_FRAME'
export const DXF_WEED_LAYER = 'DW_WEED'
export const DXF_LABEL_LAYER = 'DW_LABEL'

export interface CutSheetDxfInput extends CutSheetInput {
  /** Chord tolerance for the curves, mm (default 0.05). */
  toleranceMm?: number
}

const EOL = '\r\n'

/** A whole number of hundredths of a millimetre as a decimal, without trailing zeros. */
function hundredths(v: number): string {
  if (v < 0) return '-' + hundredths(-v)
  const i = Math.floor(v / 100), r = v - i * 100
  if (r === 0) return String(i)
  return r % 10 === 0 ? `${i}.${r / 10}` : `${i}.${r < 10 ? '0' : ''}${r}`
}

const toH = (mm: number) => Math.round(mm * 100)

function unitEntry(v: number): number {
  if (v !== 0 && v !== 1 && v !== -1) throw new RangeError('Copies must be placed by quarter turns, mirror and translation only.')
  return v
}

/** One sheet's DXF document from its plan. */
export function writeSheetDxf(plan: SheetPlan): string {
  const H = toH(plan.heightMm)
  const y = (mm: number) => hundredths(H - toH(mm))
  let out = ''
  const g = (code: number, value: string | number) => { out += `${code}${EOL}${value}${EOL}` }
  g(0, 'SECTION'); g(2, 'HEADER')
  g(9, '$ACADVER'); g(1, 'AC1009')
  g(9, '$INSUNITS'); g(70, 4)
  g(9, '$EXTMIN'); g(10, 0); g(20, 0); g(30, 0)
  g(9, '$EXTMAX'); g(10, formatMm(plan.widthMm)); g(20, formatMm(plan.heightMm)); g(30, 0)
  g(0, 'ENDSEC')
  g(0, 'SECTION'); g(2, 'ENTITIES')

  for (const t of plan.texts) {
    // Baseline from (x, y) to its end, along +x, or down the sheet when turned (−90° in y-up terms).
    const ex = t.turned ? t.x : t.x + t.widthMm, ey = t.turned ? t.y + t.widthMm : t.y
    g(0, 'TEXT'); g(8, DXF_LABEL_LAYER)
    g(10, formatMm(t.x)); g(20, y(t.y)); g(30, 0)
    g(40, formatMm(t.capHeightMm)); g(1, t.text.replace(/%%/g, '% %'))
    if (t.turned) g(50, 270)
    if (t.widthMm > 0) { g(72, 5); g(11, formatMm(ex)); g(21, y(ey)); g(31, 0) }
  }

  for (const l of plan.weedingLines) {
    for (let i = 0; i + 1 < l.length; i++) {
      const a = l[i]!, b = l[i + 1]!
      g(0, 'LINE'); g(8, DXF_WEED_LAYER)
      g(10, formatMm(a.x)); g(20, y(a.y)); g(30, 0)
      g(11, formatMm(b.x)); g(21, y(b.y)); g(31, 0)
    }
  }

  const designs = new Map(plan.designs.map((d) => [d.id, d]))
  const head = `0${EOL}POLYLINE${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}66${EOL}1${EOL}10${EOL}0${EOL}20${EOL}0${EOL}30${EOL}0${EOL}70${EOL}1${EOL}`
  const vertex = `0${EOL}VERTEX${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}10${EOL}`
  const seqend = `0${EOL}SEQEND${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}`
  for (const copy of plan.copies) {
    const design = designs.get(copy.designId)
    if (!design) throw new RangeError(`Copy ${copy.id} names design ${copy.designId}, which is not on the sheet.`)
    const t: Affine = copy.transform
    const a = unitEntry(t.a), b = unitEntry(t.b), c = unitEntry(t.c), d = unitEntry(t.d)
    const e = toH(t.e), f = H - toH(t.f)
    for (const poly of design.polygons) {
      out += head
      for (let i = 0; i < poly.length; i += 2) {
        const px = poly[i]!, py = poly[i + 1]!
        out += `${vertex}${hundredths(a * px + c * py + e)}${EOL}20${EOL}${hundredths(f - (b * px + d * py))}${EOL}30${EOL}0${EOL}`
      }
      out += seqend
    }
  }

  for (const fr of plan.frames) closedPolyline(g, DXF_FRAME_LAYER, rectPoints(fr.rect), y)
  g(0, 'ENDSEC')
  g(0, 'EOF')
  return out
}

function closedPolyline(g: (code: number, value: string | number) => void, layer: string, points: Point[], y: (mm: number) => string): void {
  g(0, 'POLYLINE'); g(8, layer); g(66, 1); g(10, 0); g(20, 0); g(30, 0); g(70, 1)
  for (const p of points) {
    g(0, 'VERTEX'); g(8, layer); g(10, formatMm(p.x)); g(20, y(p.y)); g(30, 0)
  }
  g(0, 'SEQEND'); g(8, layer)
}

function rectPoints(r: Rect): Point[] {
  return [
    { x: r.x, y: r.y }, { x: r.x + r.width, y: r.y },
    { x: r.x + r.width, y: r.y + r.height }, { x: r.x, y: r.y + r.height },
  ]
}

/** A one-job cut sheet: one DXF R12 document per sheet, in sheet order (the same sheets as cutSheetSvg). */
export function cutSheetDxf(input: CutSheetDxfInput): string[] {
  return jobSheetPlans(input, { strokeMm: HAIRLINE_MM, toleranceMm: input.toleranceMm ?? FLATTEN_TOLERANCE_MM }).map(writeSheetDxf)
}
