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

const toH = (mm: number) => Math.round(mm * 100)

/**
 * The file is ASCII, written into a growing buffer: a 200-copy sheet of a detailed drawing has
 * hundreds of thousands of vertices, and joining that many short strings costs far more than
 * writing their bytes.
 */
class AsciiWriter {
  private buf: Uint8Array
  private pos = 0

  constructor(expectedBytes: number) {
    this.buf = new Uint8Array(Math.max(1 << 16, expectedBytes))
  }

  /** Makes room for n more bytes and hands out the buffer and position, for a caller that writes them itself. */
  reserve(n: number): { buf: Uint8Array, pos: number } {
    this.room(n)
    return { buf: this.buf, pos: this.pos }
  }

  /** Moves past bytes a caller wrote after reserve(). */
  advance(to: number): void {
    this.pos = to
  }

  private room(n: number): void {
    if (this.pos + n <= this.buf.length) return
    let size = this.buf.length * 2
    while (size < this.pos + n) size *= 2
    const next = new Uint8Array(size)
    next.set(this.buf.subarray(0, this.pos))
    this.buf = next
  }

  /** ASCII text only (our entity names, layers and numbers; labels are letters, digits, '.', '-', '_'). */
  text(s: string): void {
    this.room(s.length)
    for (let i = 0; i < s.length; i++) this.buf[this.pos++] = s.charCodeAt(i) & 0x7f
  }

  bytes(): Uint8Array {
    return this.buf.subarray(0, this.pos)
  }
}

/** Writes a whole number of hundredths as a decimal without trailing zeros, then CR LF; returns the new position. */
function putHundredths(buf: Uint8Array, p: number, v: number): number {
  if (v < 0) { buf[p++] = 45; v = -v } // '-'
  let whole = Math.floor(v / 100)
  const frac = v - whole * 100
  if (whole === 0) buf[p++] = 48
  else {
    // Digits from the last backwards, into the places the number will take.
    const n = whole < 10 ? 1 : whole < 100 ? 2 : whole < 1000 ? 3 : whole < 10_000 ? 4 : whole < 100_000 ? 5 : whole < 1_000_000 ? 6 : 7
    for (let q = p + n - 1; whole > 0; q--) {
      const tenth = Math.floor(whole / 10)
      buf[q] = 48 + whole - tenth * 10
      whole = tenth
    }
    p += n
  }
  if (frac !== 0) {
    const tens = Math.floor(frac / 10), units = frac - tens * 10
    buf[p++] = 46 // '.'
    buf[p++] = 48 + tens
    if (units !== 0) buf[p++] = 48 + units
  }
  buf[p++] = 13
  buf[p++] = 10
  return p
}

/** A whole number of hundredths from the table when it is there, else digit by digit. */
function putNumber(buf: Uint8Array, p: number, v: number, t: NumberTable): number {
  if (v < 0 || v > t.n) return putHundredths(buf, p, v)
  const bytes = t.bytes
  for (let i = t.start[v]!, end = t.start[v + 1]!; i < end; i++) buf[p++] = bytes[i]!
  return p
}

const ascii = (s: string) => Uint8Array.from(s, (c) => c.charCodeAt(0))

function unitEntry(v: number): number {
  if (v !== 0 && v !== 1 && v !== -1) throw new RangeError('Copies must be placed by quarter turns, mirror and translation only.')
  return v
}

/**
 * Every whole number of hundredths from 0 to n, each already written as putHundredths writes it
 * (CR LF included), one after another, with where each starts. Writing a vertex's numbers then
 * copies a few bytes instead of dividing digit by digit: most of a big sheet's time went there.
 */
interface NumberTable { n: number, bytes: Uint8Array, start: Uint32Array }
let numberTable: NumberTable = { n: -1, bytes: new Uint8Array(0), start: new Uint32Array(1) }

function numbersUpTo(n: number): NumberTable {
  if (numberTable.n >= n) return numberTable
  // At most 7 digits, '.', 2 decimals and CR LF each.
  const bytes = new Uint8Array((n + 1) * 12)
  const start = new Uint32Array(n + 2)
  let p = 0
  for (let v = 0; v <= n; v++) {
    start[v] = p
    p = putHundredths(bytes, p, v)
  }
  start[n + 1] = p
  numberTable = { n, bytes: bytes.slice(0, p), start }
  return numberTable
}

/** One sheet's DXF document from its plan, as ASCII bytes. */
export function writeSheetDxfBytes(plan: SheetPlan): Uint8Array {
  const H = toH(plan.heightMm)
  const y = (mm: number) => formatMm((H - toH(mm)) / 100)
  // Sized once for the most a vertex can take (see below), so the buffer never has to grow.
  const vertexCount = new Map(plan.designs.map((d) => [d.id, d.polygons.reduce((n, p) => n + p.length / 2, 0)]))
  const polygonCount = new Map(plan.designs.map((d) => [d.id, d.polygons.length]))
  const w = new AsciiWriter(4096 + 200 * plan.texts.length + 120 * plan.weedingLines.length + 300 * plan.frames.length
    + plan.copies.reduce((n, c) => n + 64 * (vertexCount.get(c.designId) ?? 0) + 128 * (polygonCount.get(c.designId) ?? 0), 0))
  const g = (code: number, value: string | number) => { w.text(`${code}${EOL}${value}${EOL}`) }
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
  // Copies lie on the sheet, so their coordinates are 0…the sheet's longer side.
  const table = numbersUpTo(Math.max(H, toH(plan.widthMm)))
  const head = ascii(`0${EOL}POLYLINE${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}66${EOL}1${EOL}10${EOL}0${EOL}20${EOL}0${EOL}30${EOL}0${EOL}70${EOL}1${EOL}`)
  const vertex = ascii(`0${EOL}VERTEX${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}10${EOL}`)
  const z = ascii(`30${EOL}0${EOL}`)
  // The end of one vertex and the start of the next, as one piece.
  const zVertex = ascii(`30${EOL}0${EOL}0${EOL}VERTEX${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}10${EOL}`)
  const seqend = ascii(`0${EOL}SEQEND${EOL}8${EOL}${DXF_CUT_LAYER}${EOL}`)
  for (const copy of plan.copies) {
    const design = designs.get(copy.designId)
    if (!design) throw new RangeError(`Copy ${copy.id} names design ${copy.designId}, which is not on the sheet.`)
    const t: Affine = copy.transform
    const a = unitEntry(t.a), b = unitEntry(t.b), c = unitEntry(t.c), d = unitEntry(t.d)
    const e = toH(t.e), f = H - toH(t.f)
    for (const poly of design.polygons) {
      if (poly.length === 0) continue
      // Each vertex takes at most 24 + 2 × 12 + 10 bytes; reserve the polyline's worth at once.
      const r = w.reserve(head.length + seqend.length + (poly.length / 2) * 64)
      const buf = r.buf
      // TypedArray.set copies the fixed pieces several times faster than a byte loop.
      let p = r.pos
      buf.set(head, p); p += head.length
      buf.set(vertex, p); p += vertex.length
      for (let i = 0; i < poly.length; i += 2) {
        const px = poly[i]!, py = poly[i + 1]!
        if (i > 0) { buf.set(zVertex, p); p += zVertex.length }
        p = putNumber(buf, p, a * px + c * py + e, table)
        buf[p] = 50; buf[p + 1] = 48; buf[p + 2] = 13; buf[p + 3] = 10; p += 4 // "20" CR LF
        p = putNumber(buf, p, f - (b * px + d * py), table)
      }
      buf.set(z, p); p += z.length
      buf.set(seqend, p); p += seqend.length
      w.advance(p)
    }
  }

  for (const fr of plan.frames) closedPolyline(g, DXF_FRAME_LAYER, rectPoints(fr.rect), y)
  g(0, 'ENDSEC')
  g(0, 'EOF')
  return w.bytes()
}

/** One sheet's DXF document from its plan. */
export function writeSheetDxf(plan: SheetPlan): string {
  const b = writeSheetDxfBytes(plan)
  return Buffer.from(b.buffer, b.byteOffset, b.length).toString('latin1')
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
