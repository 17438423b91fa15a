// A small reader of SVG path data (SVG 1.1, §8.3 path data grammar) into absolute segments:
// M L H V C S Q T Z in both absolute and relative forms. Quadratic Béziers are raised to
// cubics exactly. Elliptical arcs are not supported (the clean vector never contains them).
import type { Point, Segment } from './trace'

export interface SubPath {
  segments: Segment[]
  closed: boolean
}

const NUMBER = /[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/y
const COMMAND = /[MmLlHhVvCcSsQqTtZzAa]/y
const SPACE = /[\s,]*/y

function tokenize(d: string): Array<string | number> {
  const out: Array<string | number> = []
  let i = 0
  while (i < d.length) {
    SPACE.lastIndex = i
    SPACE.exec(d)
    i = SPACE.lastIndex
    if (i >= d.length) break
    COMMAND.lastIndex = i
    const c = COMMAND.exec(d)
    if (c) { out.push(c[0]); i = COMMAND.lastIndex; continue }
    NUMBER.lastIndex = i
    const n = NUMBER.exec(d)
    if (!n) throw new SyntaxError(`Unreadable path data at character ${i}: "${d.slice(i, i + 12)}"`)
    out.push(Number(n[0]))
    i = NUMBER.lastIndex
  }
  return out
}

const ARGS: Record<string, number> = { m: 2, l: 2, h: 1, v: 1, c: 6, s: 4, q: 4, t: 2, z: 0 }

export function parsePathData(d: string): SubPath[] {
  const tokens = tokenize(d)
  const paths: SubPath[] = []
  let current: SubPath | null = null
  let pos: Point = { x: 0, y: 0 }
  let start: Point = { x: 0, y: 0 }
  let lastCubicCtrl: Point | null = null
  let lastQuadCtrl: Point | null = null
  let i = 0
  let cmd = ''
  const num = () => {
    const t = tokens[i++]
    if (typeof t !== 'number') throw new SyntaxError('Path data: a number was expected.')
    return t
  }
  const ensure = () => {
    if (!current) { current = { segments: [], closed: false }; paths.push(current); start = { ...pos } }
    return current
  }
  while (i < tokens.length) {
    const t = tokens[i]
    if (typeof t === 'string') { cmd = t; i++ } else if (!cmd) throw new SyntaxError('Path data must start with a command.')
    else if (cmd === 'M') cmd = 'L'
    else if (cmd === 'm') cmd = 'l'
    const lower = cmd.toLowerCase()
    if (lower === 'a') throw new SyntaxError('Elliptical arcs are not supported in path data here.')
    const rel = cmd !== cmd.toUpperCase()
    const bx = rel ? pos.x : 0, by = rel ? pos.y : 0
    if (ARGS[lower] === undefined) throw new SyntaxError(`Unknown path command ${cmd}.`)
    let cubicCtrl: Point | null = null
    let quadCtrl: Point | null = null
    switch (lower) {
      case 'm': {
        const p = { x: bx + num(), y: by + num() }
        current = { segments: [], closed: false }
        paths.push(current)
        pos = p
        start = { ...p }
        break
      }
      case 'z': {
        const c = ensure()
        if (pos.x !== start.x || pos.y !== start.y) c.segments.push({ kind: 'line', from: pos, to: { ...start } })
        c.closed = true
        pos = { ...start }
        current = null
        break
      }
      case 'l': case 'h': case 'v': {
        const c = ensure()
        const to = lower === 'l' ? { x: bx + num(), y: by + num() }
          : lower === 'h' ? { x: (rel ? pos.x : 0) + num(), y: pos.y }
            : { x: pos.x, y: (rel ? pos.y : 0) + num() }
        c.segments.push({ kind: 'line', from: pos, to })
        pos = to
        break
      }
      case 'c': case 's': {
        const c = ensure()
        let c1: Point
        if (lower === 'c') c1 = { x: bx + num(), y: by + num() }
        else c1 = lastCubicCtrl ? { x: 2 * pos.x - lastCubicCtrl.x, y: 2 * pos.y - lastCubicCtrl.y } : { ...pos }
        const c2 = { x: bx + num(), y: by + num() }
        const to = { x: bx + num(), y: by + num() }
        c.segments.push({ kind: 'cubic', from: pos, c1, c2, to })
        cubicCtrl = c2
        pos = to
        break
      }
      case 'q': case 't': {
        const c = ensure()
        let q: Point
        if (lower === 'q') q = { x: bx + num(), y: by + num() }
        else q = lastQuadCtrl ? { x: 2 * pos.x - lastQuadCtrl.x, y: 2 * pos.y - lastQuadCtrl.y } : { ...pos }
        const to = { x: bx + num(), y: by + num() }
        // degree elevation: C1 = P0 + 2/3 (Q − P0), C2 = P2 + 2/3 (Q − P2)
        const c1 = { x: pos.x + (2 / 3) * (q.x - pos.x), y: pos.y + (2 / 3) * (q.y - pos.y) }
        const c2 = { x: to.x + (2 / 3) * (q.x - to.x), y: to.y + (2 / 3) * (q.y - to.y) }
        c.segments.push({ kind: 'cubic', from: pos, c1, c2, to })
        quadCtrl = q
        pos = to
        break
      }
    }
    lastCubicCtrl = cubicCtrl
    lastQuadCtrl = quadCtrl
  }
  return paths.filter((p) => p.segments.length > 0)
}
