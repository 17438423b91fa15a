// A revision made from a source: the single-colour pipeline, and beside it the colour layers'
// path (server/pipeline/colour/upload.ts), which decides from what it finds whether the
// drawing is layered. A one-ink drawing keeps the single-colour result, exactly as before; a
// layered one is stored as layers (each its prepared bitmap, raw outline and clean vector as
// cut) under a stacked clean vector, with the totals as the revision's measurements.
import type { Transaction } from 'kysely'
import type { Database } from '../db/schema'
import type { RevisionColour } from '#shared/types/layers'
import type { Measurements, StageTimings } from '#shared/types/pipeline'
import type { PipelineSettings } from '#shared/utils/settings'
import type { LayerResult, LayeredRunResult } from '../pipeline/colour/run-layers'
import { layeredUpload, layersAsAsked } from '../pipeline/colour/upload'
import type { ColourSettings } from '#shared/utils/colour-settings'
import type { RunResult } from '../pipeline/run'
import { contentHash } from '../platform/object-store'
import { runColourInPool, runInPool } from '../platform/pipeline-pool'
import type { ObjectToStore } from './objects'

type Layers = Extract<LayeredRunResult, { kind: 'layers' }>

export interface MadeRevision {
  /** The single-colour result: the revision itself for one ink; for layers, its prepared bitmap and raw outline (the drawing's ink as one). */
  single: RunResult
  layered: { result: Layers; colour: RevisionColour } | null
}

/**
 * Runs both paths side by side in the pool. A refusal of the single-colour pipeline (not a
 * drawing, bad settings) is the answer, as before; a failure of the colour path only leaves the
 * drawing one colour (and is logged).
 */
export async function runRevisionWork(req: { source: Uint8Array; settings: PipelineSettings; widthMm: number; colour?: ColourSettings }): Promise<MadeRevision> {
  const { colour, ...common } = req
  const singleRun = runInPool({ ...common, purpose: 'revision' })
  // The designer's colour settings from the bench, when given; otherwise found and decided here.
  // Either way on the frame the one-colour clean-up chose (a photo it straightened, straightened alike).
  const choices = singleRun.then((r) => r.choices)
  const layeredRun = (colour
    ? layersAsAsked(runColourInPool, { ...common, purpose: 'revision' }, colour, choices)
    : layeredUpload(runColourInPool, { ...common, purpose: 'revision' }, choices))
    .catch((err: unknown) => ({ kind: 'failed' as const, err }))
  const single = await singleRun
  const layered = await layeredRun
  if (layered.kind === 'failed') {
    console.error('[decalwright] the colour layers could not be made; the revision is one colour:', layered.err instanceof Error ? layered.err.stack ?? layered.err.message : layered.err)
    return { single, layered: null }
  }
  return { single, layered: layered.kind === 'layers' ? { result: layered.result, colour: layered.colour } : null }
}

const enc = new TextEncoder()
const svgObject = (folder: 'outline' | 'vector', text: string): ObjectToStore => {
  const bytes = enc.encode(text)
  return { key: `${folder}/${contentHash(bytes)}.svg`, bytes, type: 'image/svg+xml' }
}
const pngObject = (bytes: Uint8Array): ObjectToStore => ({ key: `prepared/${contentHash(bytes)}.png`, bytes, type: 'image/png' })

export interface LayerFiles { prepared: string; outline: string; vector: string }

/** Each layer's files under content-addressed keys, bottom first, and the stacked vector's. */
export function layerObjects(result: Layers): { layers: LayerFiles[]; stacked: string; objects: ObjectToStore[] } {
  const objects: ObjectToStore[] = []
  const layers = result.layers.map((l) => {
    const files = [pngObject(l.preparedPng), svgObject('outline', l.rawOutlineSvg), svgObject('vector', l.cleanSvg)]
    objects.push(...files)
    return { prepared: files[0]!.key, outline: files[1]!.key, vector: files[2]!.key }
  })
  const stacked = svgObject('vector', result.stackedSvg)
  objects.push(stacked)
  return { layers, stacked: stacked.key, objects }
}

/**
 * The layered revision's measurements: sums of area, cut length, pieces, holes, nodes and small
 * pieces; the narrowest stroke of any layer; fidelity as the layers' mean weighted by ink
 * area; the size of the framed canvas every layer shares. The grey threshold is the one-colour
 * clean-up's (the starting point if the designer goes back to one colour).
 */
export function totalMeasurements(layers: LayerResult[], frame: { widthMm: number; heightMm: number }, threshold: number): Measurements {
  const m = layers.map((l) => l.measurements)
  const sum = (k: 'inkAreaMm2' | 'cutLengthMm' | 'pieces' | 'holes' | 'nodes' | 'smallPieces') => m.reduce((s, x) => s + x[k], 0)
  const narrow = m.map((x) => x.narrowestFeatureMm).filter((x): x is number => x !== null)
  const area = sum('inkAreaMm2')
  const round = (x: number, d: number) => Math.round(x * 10 ** d) / 10 ** d
  return {
    widthMm: frame.widthMm, heightMm: frame.heightMm,
    inkAreaMm2: round(area, 2), cutLengthMm: round(sum('cutLengthMm'), 2),
    pieces: sum('pieces'), holes: sum('holes'), nodes: sum('nodes'),
    narrowestFeatureMm: narrow.length ? Math.min(...narrow) : null,
    smallPieces: sum('smallPieces'), smallPieceLimitMm2: m[0]!.smallPieceLimitMm2,
    fidelity: round(area > 0 ? m.reduce((s, x) => s + x.fidelity * x.inkAreaMm2, 0) / area : Math.min(...m.map((x) => x.fidelity)), 4),
    threshold, pxPerMm: m[0]!.pxPerMm, preparedWidthPx: m[0]!.preparedWidthPx, preparedHeightPx: m[0]!.preparedHeightPx,
  }
}

export function layeredTimings(result: Layers): StageTimings {
  const t = result.timings
  return { prepareMs: t.decodeMs + t.separateMs, traceMs: t.traceMs, cleanMs: t.cleanMs + t.stackMs, measureMs: t.measureMs, totalMs: t.totalMs }
}

/** The layers' rows, bottom first (position 0). */
export async function insertLayers(trx: Transaction<Database>, revisionId: number, result: Layers, files: LayerFiles[]): Promise<void> {
  await trx.insertInto('revision_layer').values(result.layers.map((l, position) => ({
    revision_id: revisionId, position, name: l.name.slice(0, 60), hex: l.hex.toLowerCase(),
    prepared_key: files[position]!.prepared, outline_key: files[position]!.outline, vector_key: files[position]!.vector,
    measurements: JSON.stringify(l.measurements),
  }))).execute()
}
