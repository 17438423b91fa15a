// Entry for a worker thread (piscina) that builds cut sheets off the request thread. A
// 200-copy sheet of a detailed drawing is tens of megabytes of DXF. A set the server keeps is
// stored by this thread itself and only the sheets' figures come back: tens of megabytes
// arriving on the server's thread made its collector pause the event loop (measured with
// --trace-gc). Files asked for as bytes come back as UTF-8 whose buffers are transferred, not
// copied. When bundling this file, keep 'piscina' and '@aws-sdk/*' external: move() marks the
// answer with a symbol private to the copy of piscina that runs the thread.
import { move, transferableSymbol, valueSymbol } from 'piscina'
import { configurePlatform, type PlatformConfig } from '../platform/config'
import { ServiceUnavailable } from '../platform/faults'
import { forgetObjectStoreClient, putObject } from '../platform/object-store'
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

/** Where a kept set's files go (`<prefix>sheet-<n>.svg` and `.dxf`, n from 1) and the store that holds them. */
export interface KeepTo { prefix: string, store: Pick<PlatformConfig, 's3' | 's3TimeoutMs'> }

/** The key of sheet `n`'s file in a set kept under `prefix`. */
export const keptSheetKey = (prefix: string, n: number, format: 'svg' | 'dxf') => `${prefix}sheet-${n}.${format}`

export type CutSheetRequest =
  | { kind: 'batch', input: BatchSheetInput }
  | { kind: 'batch-packed', input: PackedBatchInput }
  | { kind: 'batch-vectors', input: VectorBatchInput }
  /** As batch-vectors, but the thread stores both files of every sheet and answers their sizes. */
  | { kind: 'keep-vectors', input: VectorBatchInput, keep: KeepTo }
  | { kind: 'test-grid', input: TestGridInput }
  /** Only where the copies go (the job and batch pages): a few hundred copies take tens of milliseconds. */
  | { kind: 'pack', input: PackInput }

export type SheetBytes = Omit<BuiltSheet, 'svg' | 'dxf'> & { svg?: Uint8Array, dxf?: Uint8Array }
export type SheetsBytes = Omit<BatchSheets, 'sheets'> & { sheets: SheetBytes[] }
export type SheetsKept = Omit<BatchSheets, 'sheets'> & { sheets: (Omit<BuiltSheet, 'svg' | 'dxf'> & { svgBytes: number, dxfBytes: number })[] }

export type CutSheetAnswer =
  | { ok: true, kind: 'batch', result: SheetsBytes }
  | { ok: true, kind: 'batch-packed', result: SheetsBytes }
  | { ok: true, kind: 'batch-vectors', result: SheetsBytes }
  | { ok: true, kind: 'test-grid', result: Omit<TestGrid, 'svg' | 'dxf'> & { svg: Uint8Array, dxf: Uint8Array } }
  | { ok: true, kind: 'pack', result: PackResult }
  | { ok: true, kind: 'keep-vectors', result: SheetsKept }
  /** settings: the input cannot make a sheet; store: the file store did not answer. */
  | { ok: false, kind: 'settings' | 'store' | 'internal', message: string }

const utf8 = new TextEncoder()

/** Wraps an answer so piscina transfers the file bytes' buffers instead of copying them. */
function transferring(answer: CutSheetAnswer, bytes: Uint8Array[]) {
  return move({
    get [transferableSymbol]() { return bytes.map((b) => b.buffer) },
    get [valueSymbol]() { return answer },
  } as unknown as ArrayBuffer)
}

/** Errors cross the thread boundary as plain data; RangeError means the input cannot make a sheet. */
function failed(err: unknown): CutSheetAnswer {
  if (err instanceof RangeError) return { ok: false, kind: 'settings', message: err.message }
  if (err instanceof ServiceUnavailable) return { ok: false, kind: 'store', message: err.reason }
  return { ok: false, kind: 'internal', message: (err as Error).message ?? String(err) }
}

const fromVectors = (input: VectorBatchInput): BatchSheetInput =>
  ({ ...input, designs: input.designs.map(({ vector, ...d }) => ({ ...d, ...readCleanVectorAt(vector, d.widthMm) })) })

export function runCutSheetRequest(req: Exclude<CutSheetRequest, { kind: 'keep-vectors' }>): { answer: CutSheetAnswer, bytes: Uint8Array[] } {
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
        : fromVectors(req.input)
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
    return { answer: failed(err), bytes: [] }
  }
}

let storeSeen = ''

/** Tells this thread's object-store module which store to use (the thread has no Nitro config). */
function useStore(store: KeepTo['store']) {
  const seen = JSON.stringify(store)
  if (seen === storeSeen) return
  // Only the store is used here; the rest of the platform (database, mail) stays on the server.
  configurePlatform({ databaseUrl: '', smtpUrl: '', mailFrom: '', mailOutboxDir: '', baseUrl: '', ...store })
  forgetObjectStoreClient()
  storeSeen = seen
}

/**
 * Builds the sheets and stores each sheet's SVG and DXF as it is written, one sheet at a time
 * (a set's files never all sit in memory at once); answers the sheets' figures and file sizes.
 */
export async function keepCutSheets(input: VectorBatchInput, keep: KeepTo): Promise<CutSheetAnswer> {
  try {
    useStore(keep.store)
    const { svg: withSvg = true, dxf: withDxf = true } = input.formats ?? {}
    if (!withSvg || !withDxf) throw new RangeError('A kept set has both files of every sheet.')
    const out = planCutSheets(fromVectors(input))
    const sheets: SheetsKept['sheets'] = []
    for (const [i, { plan, ...s }] of out.sheets.entries()) {
      const svg = utf8.encode(writeSheetSvg(plan))
      const dxf = writeSheetDxfBytes(plan)
      await Promise.all([
        putObject(keptSheetKey(keep.prefix, i + 1, 'svg'), svg, 'image/svg+xml'),
        putObject(keptSheetKey(keep.prefix, i + 1, 'dxf'), dxf, 'application/dxf'),
      ])
      sheets.push({ ...s, svgBytes: svg.byteLength, dxfBytes: dxf.byteLength })
    }
    return { ok: true, kind: 'keep-vectors', result: { ...out, sheets } }
  } catch (err) {
    return failed(err)
  }
}

export default async function work(req: CutSheetRequest) {
  if (req.kind === 'keep-vectors') return keepCutSheets(req.input, req.keep)
  const { answer, bytes } = runCutSheetRequest(req)
  return transferring(answer, bytes)
}
