// Outside readers for cut sheet files: dxf-parser (npm) for DXF, and Debian's Python with
// Shapely (python3-shapely) and ezdxf (python3-ezdxf) as independent geometry and DXF checks.
// Nothing here imports the code under test.
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import DxfParser from 'dxf-parser'

export interface XY { x: number, y: number }
export interface DxfPolyline { type: 'POLYLINE', layer: string, shape: boolean, vertices: XY[] }
export interface DxfLine { type: 'LINE', layer: string, vertices: XY[] }
export interface DxfText { type: 'TEXT', layer: string, startPoint: XY, endPoint?: XY, textHeight: number, text: string, rotation?: number, halign?: number }
export type DxfEntity = DxfPolyline | DxfLine | DxfText

/** Read back with dxf-parser, a general-purpose DXF reader from npm. */
export function readDxf(dxf: string): { header: Record<string, unknown>, entities: DxfEntity[] } {
  const doc = new DxfParser().parseSync(dxf) as unknown as { header: Record<string, unknown>, entities: DxfEntity[] } | null
  if (!doc) throw new Error('dxf-parser read nothing')
  return doc
}

export const polylines = (entities: DxfEntity[], layer: string) => entities.filter((e): e is DxfPolyline => e.type === 'POLYLINE' && e.layer === layer)
export const lines = (entities: DxfEntity[], layer: string) => entities.filter((e): e is DxfLine => e.type === 'LINE' && e.layer === layer)
export const texts = (entities: DxfEntity[], layer: string) => entities.filter((e): e is DxfText => e.type === 'TEXT' && e.layer === layer)

const PYTHON = '/usr/bin/python3'

/**
 * Runs a Python script with Debian's interpreter, JSON in on stdin, JSON out on stdout. Fails
 * with a clear message (never skips) when the interpreter or a module is missing.
 */
export function python<T>(script: string, input: unknown, modules: string[]): T {
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: install Debian's python3 with ${modules.map((m) => `python3-${m}`).join(' and ')} (apt-get install ${modules.map((m) => `python3-${m}`).join(' ')}).`)
  const r = spawnSync(PYTHON, ['-c', script], { input: JSON.stringify(input), encoding: 'utf8', maxBuffer: 1 << 28 })
  if (r.status !== 0) {
    if (/ModuleNotFoundError/.test(r.stderr)) throw new Error(`A Python module is missing (${r.stderr.trim().split('\n').pop()}): apt-get install ${modules.map((m) => `python3-${m}`).join(' ')}.`)
    throw new Error(`python failed: ${r.stderr}`)
  }
  return JSON.parse(r.stdout) as T
}

/** ezdxf's own reader and auditor on the file as written (ezdxf.readfile, Drawing.audit). */
export function ezdxfAudit(dxf: string): { version: string, errors: string[], fixes: string[], counts: Record<string, number>, layers: Record<string, number> } {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-dxf-'))
  try {
    const file = path.join(dir, 'sheet.dxf')
    writeFileSync(file, dxf)
    return python(`
import json, sys, ezdxf
doc = ezdxf.readfile(json.load(sys.stdin))
a = doc.audit()
counts, layers = {}, {}
for e in doc.modelspace():
    counts[e.dxftype()] = counts.get(e.dxftype(), 0) + 1
    layers[e.dxf.layer] = layers.get(e.dxf.layer, 0) + 1
print(json.dumps({"version": doc.dxfversion, "errors": [str(x) for x in a.errors], "fixes": [str(x) for x in a.fixes], "counts": counts, "layers": layers}))
`, file, ['ezdxf'])
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

/** Shapely's answer for the given script (the input is bound to `data`, the result printed as JSON). */
export function shapely<T>(body: string, data: unknown): T {
  return python<T>(`
import json, sys
from shapely.geometry import Polygon, LineString, LinearRing, Point, box
from shapely.ops import unary_union
data = json.load(sys.stdin)
${body}
`, data, ['shapely'])
}

/** Bounding box of points. */
export function bbox(pts: XY[]): { x0: number, y0: number, x1: number, y1: number } {
  return {
    x0: Math.min(...pts.map((p) => p.x)), y0: Math.min(...pts.map((p) => p.y)),
    x1: Math.max(...pts.map((p) => p.x)), y1: Math.max(...pts.map((p) => p.y)),
  }
}
