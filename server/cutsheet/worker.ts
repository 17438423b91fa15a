// Entry for a worker thread (piscina) that builds cut sheets off the request thread. A
// 200-copy sheet of a detailed drawing is tens of megabytes of DXF: the files come back as
// UTF-8 bytes whose buffers are transferred, not copied, so the server's event loop neither
// builds nor copies them. When bundling this file, keep 'piscina' external: move() marks the
// answer with a symbol private to the copy of piscina that runs the thread.
import { move, transferableSymbol, valueSymbol } from 'piscina'
import { unpackCurves } from './curve-buffer'
import { writeSheetDxfBytes } from './dxf'
import { readCleanVectorAt } from './path'
import { packBatch, type PackInput, type PackResult } from './pack'
import { planCutSheets, type BatchDesign, type BatchSheetInput, type BatchSheets, type BuiltSheet } from './sheet'
import { writeSheetSvg } from './svg'
import { testGrid, type TestGrid, type TestGridInput } from './test-grid'

/** A batch whose designs' curves come packed in typed arrays (curve-buffer.ts), handed over without a copy. */
export type PackedBatchInput = Omit<BatchSheetInput, 'designs'> & { designs: (Omit<BatchDesign, 'curves'> & { packed: Float64Array })[] }

/**
 * A batch as the server sends it: each design's stored clean vector (bytes in shared memory, or
 * handed over) and the width to place it at; the thread reads and scales the curves itself.
 */
export type VectorBatchInput = Omit<BatchSheetInput, 'designs'> & { designs: (Omit<BatchDesign, 'curves' | 'heightMm'> & { vector: Uint8Array })[] }

export type CutSheetRequest =
  | { kind: 'batch', input: BatchSheetInput }
  | { kind: 'batch-packed', input: PackedBatchInput }
  | { kind: 'batch-vectors', input: VectorBatchInput }
  | { kind: 'test-grid', input: TestGridInput }
  /** Only where the copies go (the job and batch pages): a few hundred copies take tens of milliseconds. */
  | { kind: 'pack', input: PackInput }

export type SheetBytes = Omit<BuiltSheet, 'svg' | 'dxf'> & { svg?: Uint8Array, dxf?: Uint8Array }
export type SheetsBytes = Omit<BatchSheets, 'sheets'> & { sheets: SheetBytes[] }

export type CutSheetAnswer =
  | { ok: true, kind: 'batch', result: SheetsBytes }
  | { ok: true, kind: 'batch-packed', result: SheetsBytes }
  | { ok: true, kind: 'batch-vectors', result: SheetsBytes }
  | { ok: true, kind: 'test-grid', result: Omit<TestGrid, 'svg' | 'dxf'> & { svg: Uint8Array, dxf: Uint8Array } }
  | { ok: true, kind: 'pack', result: PackResult }
  | { ok: false, kind: 'settings' | 'internal', message: string }

const utf8 = new TextEncoder()

/** Wraps an answer so piscina transfers the file bytes' buffers instead of copying them. */
function transferring(answer: CutSheetAnswer, bytes: Uint8Array[]) {
  return move({
    get [transferableSymbol]() { return bytes.map((b) => b.buffer) },
    get [valueSymbol]() { return answer },
  } as unknown as ArrayBuffer)
}

export function runCutSheetRequest(req: CutSheetRequest): { answer: CutSheetAnswer, bytes: Uint8Array[] } {
  try {
    const bytes: Uint8Array[] = []
    const keep = (b: Uint8Array) => { bytes.push(b); return b }
    if (req.kind === 'test-grid') {
      const g = testGrid(req.input)
      return { answer: { ok: true, kind: 'test-grid', result: { ...g, svg: keep(utf8.encode(g.svg)), dxf: keep(utf8.encode(g.dxf)) } }, bytes }
    }
    if (req.kind === 'pack') return { answer: { ok: true, kind: 'pack', result: packBatch(req.input) }, bytes }
    const input: BatchSheetInput = req.kind === 'batch' ? req.input
      : req.kind === 'batch-packed' ? { ...req.input, designs: req.input.designs.map(({ packed, ...d }) => ({ ...d, curves: unpackCurves(packed) })) }
        : { ...req.input, designs: req.input.designs.map(({ vector, ...d }) => ({ ...d, ...readCleanVectorAt(vector, d.widthMm) })) }
    const formats = { svg: input.formats?.svg ?? true, dxf: input.formats?.dxf ?? true }
    const out = planCutSheets(input)
    // The DXF is written straight to bytes (ASCII), never as one huge string.
    const sheets = out.sheets.map(({ plan, ...s }) => ({
      ...s,
      ...(formats.svg ? { svg: keep(utf8.encode(writeSheetSvg(plan))) } : {}),
      ...(formats.dxf ? { dxf: keep(writeSheetDxfBytes(plan)) } : {}),
    }))
    const result: SheetsBytes = { ...out, sheets }
    return { answer: { ok: true, kind: req.kind, result } as CutSheetAnswer, bytes }
  } catch (err) {
    // Errors cross the thread boundary as plain data; RangeError means the input cannot make a sheet.
    if (err instanceof RangeError) return { answer: { ok: false, kind: 'settings', message: err.message }, bytes: [] }
    return { answer: { ok: false, kind: 'internal', message: (err as Error).message ?? String(err) }, bytes: [] }
  }
}

export default function work(req: CutSheetRequest) {
  const { answer, bytes } = runCutSheetRequest(req)
  return transferring(answer, bytes)
}
