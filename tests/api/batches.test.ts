// Batches and the cut sheets behind them, through the API against real PostgreSQL and object
// storage: who may batch what, cutting and leaving, the film's kerf on the cut path, packing
// and weeding lines read back from the DXF by outside libraries, and sheets kept by content.
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'
import { beforeAll, describe, expect, inject, it } from 'vitest'
import { hashPassword } from '../../server/platform/passwords'
import { configurePlatform } from '../../server/platform/config'
import { KEPT_SHEET_MAX_AGE_S, sweepKeptSheets } from '../../server/jobs/sheets'
import { ApiClient, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { addArtwork, addRobot, buildProgram, type ProgramFixture } from '../support/fixtures'
import { allKeys, putKey } from '../support/s3'
import { L_BOX, L_PATH, rectPathData, svgMm } from '../unit/cutsheet/shapes'

const PASSWORD = 'batches-test-password'
const PYTHON = '/usr/bin/python3'

let program: ProgramFixture
let other: ProgramFixture
let operator: ApiClient
let student: ApiClient
/** A 20 mm square with a 10 mm square hole in its middle, and the 40 × 50 mm L. */
let square: { revisionId: number }
let ell: { revisionId: number }
let otherJob: number

/** Reads a DXF with ezdxf (Debian's python3-ezdxf) and measures it with shapely (python3-shapely). */
interface DxfMeasures { outer: number[][]; holes: number[][]; overlaps: number; bounds: number[]; weedingLines: number; weedingDistance: number | null }

function measureDxf(dxf: string): DxfMeasures {
  const hint = 'Install them with: apt-get install python3-ezdxf python3-shapely'
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: the cut sheet is checked with ezdxf and shapely. ${hint}`)
  try {
    execFileSync(PYTHON, ['-c', 'import ezdxf, shapely'], { stdio: 'pipe' })
  } catch {
    throw new Error(`ezdxf or shapely cannot be imported by ${PYTHON}. ${hint}`)
  }
  // The R12 reference ends its lines in CR LF; read them as lines whatever their end.
  // Outlines not inside any other are the copies' outer outlines (filled, holes and all); the
  // rest are holes. Overlap: the area two copies share. Distance: from every weeding line to the
  // nearest point of any copy, the copy's whole area included.
  const script = `
import sys, io, json, ezdxf
from shapely.geometry import Polygon, LineString
from shapely.ops import unary_union
doc = ezdxf.read(io.StringIO(sys.stdin.buffer.read().decode('ascii'), newline=None))
msp = doc.modelspace()
polys = [Polygon([(p[0], p[1]) for p in e.points()]) for e in msp.query('POLYLINE') if e.dxf.layer == 'DW_CUT']
lines = [LineString([(e.dxf.start[0], e.dxf.start[1]), (e.dxf.end[0], e.dxf.end[1])]) for e in msp.query('LINE') if e.dxf.layer == 'DW_WEED']
outer_i = [i for i, p in enumerate(polys) if not any(j != i and q.contains(p) for j, q in enumerate(polys))]
outer = [polys[i] for i in outer_i]
holes = [p for i, p in enumerate(polys) if i not in outer_i]
overlaps = sum(1 for i in range(len(outer)) for j in range(i + 1, len(outer)) if outer[i].intersection(outer[j]).area > 1e-9)
copies = unary_union(outer)
print(json.dumps({
  'outer': [list(p.bounds) for p in outer], 'holes': [list(p.bounds) for p in holes], 'overlaps': overlaps,
  'bounds': list(copies.bounds), 'weedingLines': len(lines),
  'weedingDistance': min((l.distance(copies) for l in lines), default=None),
}))
`
  return JSON.parse(execFileSync(PYTHON, ['-c', script], { input: dxf, maxBuffer: 256 * 1024 * 1024 }).toString('utf8'))
}

async function file(c: ApiClient, path: string) {
  const r = await fetch(new URL(path, c.baseUrl), { headers: { cookie: [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
  return { status: r.status, from: r.headers.get('x-sheet-from'), sheets: r.headers.get('x-sheet-count'), body: await r.text() }
}

/** A queued job of `quantity` copies at `widthMm` of a revision on a robot of team `team`, in `filmId`. */
async function queued(p: ProgramFixture, revisionId: number, widthMm: number, quantity: number, filmId = p.films.pet) {
  const db = testDb()
  const robot = await addRobot(db, p.teams[0].id)
  const placement = await db.insertInto('placement').values({ robot_id: robot, revision_id: revisionId, film_id: filmId, spot: 'side', width_mm: widthMm, quantity, created_by: p.mentor })
    .returning('id').executeTakeFirstOrThrow()
  return (await db.insertInto('job').values({ placement_id: placement.id, kind: 'initial', quantity, film_id: filmId, width_mm: widthMm, created_by: p.mentor })
    .returning('id').executeTakeFirstOrThrow()).id
}

async function vectorRevision(p: ProgramFixture, name: string, svg: string, widthMm: number, heightMm: number) {
  const key = `vectors/batches-${name}-${Date.now()}.svg`
  await putKey(key, svg, 'image/svg+xml')
  return addArtwork(testDb(), { teamId: p.teams[0].id, authorId: p.mentor, status: 'approved', vectorKey: key, widthMm, heightMm })
}

beforeAll(async () => {
  const db = testDb()
  const passwordHash = await hashPassword(PASSWORD)
  program = await buildProgram(db, { passwordHash })
  other = await buildProgram(db, { passwordHash })
  operator = await signedIn(program.emails.get(program.teams[0].operator)!, PASSWORD)
  student = await signedIn(program.emails.get(program.teams[0].student)!, PASSWORD)
  square = await vectorRevision(program, 'square', svgMm(20, 20, [`${rectPathData(0, 0, 20, 20)}${rectPathData(5, 5, 10, 10)}`]), 20, 20)
  ell = await vectorRevision(program, 'ell', svgMm(L_BOX.width, L_BOX.height, [L_PATH]), L_BOX.width, L_BOX.height)
  const farArt = await addArtwork(db, { teamId: other.teams[0].id, authorId: other.mentor, status: 'approved' })
  otherJob = await queued(other, farArt.revisionId, 40, 1, other.films.pet)
})

describe('making a batch', () => {
  it('refuses jobs in different films, jobs not queued, another program\'s jobs and people who do not work the queue', async () => {
    const a = await queued(program, square.revisionId, 20, 2)
    const b = await queued(program, ell.revisionId, 30, 1)
    const inPu = await testDb().insertInto('film').values({
      program_id: program.id, name: `Second PET ${Date.now()}`, polymer_code: 'PET', polymer_verdict: 'allowed', colour: 'white', colour_hex: '#ffffff', opacity: 'opaque',
      thickness_mm: 0.08, sheet_width_mm: 300, sheet_height_mm: 200, min_feature_mm: 0.8, kerf_mm: null, laser_power_pct: 50, laser_speed_mm_s: 10, laser_passes: 1, sheets_on_hand: 5,
    }).returning('id').executeTakeFirstOrThrow()
    const elsewhere = await queued(program, ell.revisionId, 30, 1, inPu.id)
    const cancelled = await queued(program, ell.revisionId, 30, 1)
    await testDb().updateTable('job').set({ state: 'cancelled', cancelled_at: new Date(), cancel_reason: 'test' }).where('id', '=', cancelled).execute()

    expect((await student.post('/api/batches', { jobIds: [a, b] })).status).toBe(403)
    expect((await new ApiClient().post('/api/batches', { jobIds: [a, b] })).status).toBe(401)
    const far = await operator.post('/api/batches', { jobIds: [a, otherJob] })
    expect(far.status).toBe(404)
    expect(far.body.message).toContain(String(otherJob))
    const films = await operator.post('/api/batches', { jobIds: [a, elsewhere] })
    expect(films.status).toBe(422)
    expect(films.body.message).toMatch(/one film/)
    expect((await operator.post('/api/batches', { jobIds: [a, cancelled] })).status).toBe(409)
    expect((await operator.post('/api/batches', { jobIds: [a] })).status).toBe(400)
    // Nothing joined anything.
    const rows = await testDb().selectFrom('job').select('batch_id').where('id', 'in', [a, b, elsewhere, cancelled]).execute()
    expect(rows.every((r) => r.batch_id === null)).toBe(true)

    // The queue suggested them: same film, queued, in no batch.
    const list = (await operator.get('/api/batches')).body
    expect(list.suggestions.find((s: any) => s.filmId === program.films.pet).jobIds).toEqual(expect.arrayContaining([a, b]))

    const made = await operator.post('/api/batches', { jobIds: [a, b] })
    expect(made.status, JSON.stringify(made.body)).toBe(201)
    expect(made.body.jobs.map((j: any) => j.id)).toEqual([a, b])
    expect(made.body.copies).toBe(3)
    expect((await operator.post('/api/batches', { jobIds: [a, elsewhere] })).status).toBe(409) // a is in a batch already
    // Another program's operator does not find it.
    const farOperator = await signedIn(other.emails.get(other.teams[0].operator)!, PASSWORD)
    expect((await farOperator.get(`/api/batches/${made.body.id}`)).status).toBe(404)
    expect((await student.get(`/api/batches/${made.body.id}`)).status).toBe(403)
  })

  it('the database itself keeps a batch to one film, one program and queued jobs', async () => {
    const a = await queued(program, square.revisionId, 20, 1)
    const made = await operator.post('/api/batches', { jobIds: [a, await queued(program, square.revisionId, 20, 1)] })
    expect(made.status).toBe(201)
    const farJob = await queued(other, square.revisionId, 20, 1, other.films.pet)
    // Another program's job, and a job of another film: refused by the trigger and the composite key.
    await expect(testDb().updateTable('job').set({ batch_id: made.body.id }).where('id', '=', farJob).execute()).rejects.toThrow()
    const cut = await queued(program, square.revisionId, 20, 1)
    await testDb().updateTable('job').set({ state: 'cut', cut_at: new Date() }).where('id', '=', cut).execute()
    await expect(testDb().updateTable('job').set({ batch_id: made.body.id }).where('id', '=', cut).execute()).rejects.toThrow(/queued/)
  })
})

describe('cutting and leaving', () => {
  it('a job leaves before it is cut; cutting the batch marks every job cut and takes its sheets once', async () => {
    const [a, b, c] = [await queued(program, square.revisionId, 20, 2), await queued(program, square.revisionId, 20, 3), await queued(program, ell.revisionId, 30, 1)]
    const made = (await operator.post('/api/batches', { jobIds: [a, b, c] })).body
    // A job in a batch is cut with it, not alone.
    expect((await operator.post(`/api/jobs/${a}/state`, { state: 'cut' })).status).toBe(409)
    const left = await operator.delete(`/api/batches/${made.id}/jobs/${c}`)
    expect(left.status, JSON.stringify(left.body)).toBe(200)
    expect(left.body.jobs.map((j: any) => j.id)).toEqual([a, b])
    expect((await operator.delete(`/api/batches/${made.id}/jobs/${c}`)).status).toBe(409)
    const before = await testDb().selectFrom('film').select('sheets_on_hand').where('id', '=', program.films.pet).executeTakeFirstOrThrow()
    expect((await operator.post(`/api/batches/${made.id}/cut`, { sheetsUsed: -1 })).status).toBe(400)
    const cut = await operator.post(`/api/batches/${made.id}/cut`, { sheetsUsed: 1 })
    expect(cut.status, JSON.stringify(cut.body)).toBe(200)
    expect(cut.body.state).toBe('cut')
    const jobs = await testDb().selectFrom('job').select(['id', 'state', 'batch_id']).where('id', 'in', [a, b, c]).orderBy('id').execute()
    expect(jobs.map((j) => j.state)).toEqual(['cut', 'cut', 'queued'])
    expect(jobs.map((j) => j.batch_id)).toEqual([made.id, made.id, null])
    const after = await testDb().selectFrom('film').select('sheets_on_hand').where('id', '=', program.films.pet).executeTakeFirstOrThrow()
    expect(after.sheets_on_hand).toBe(before.sheets_on_hand - 1)
    // Once cut, no job leaves, and the batch is not cut twice.
    expect((await operator.delete(`/api/batches/${made.id}/jobs/${a}`)).status).toBe(409)
    expect((await operator.post(`/api/batches/${made.id}/cut`, {})).status).toBe(409)
  })
})

describe('the sheets', () => {
  it('compensate the film\'s kerf: a 20 mm square and its 10 mm hole are cut at 20.2 and 9.8 mm with a 0.2 mm kerf, and 0 turns it off', async () => {
    await testDb().updateTable('film').set({ kerf_mm: 0.2 }).where('id', '=', program.films.pet).execute()
    const job = await queued(program, square.revisionId, 20, 1)
    const page = (await operator.get(`/api/jobs/${job}`)).body
    expect(page.layout.kerfMm).toBe(0.2)
    const sheet = await file(operator, `/api/jobs/${job}/cut-sheet.dxf`)
    expect(sheet.status, sheet.body.slice(0, 300)).toBe(200)
    // Read back by ezdxf, measured by shapely: the beam's centre runs half a kerf outside the
    // piece and half a kerf inside the hole, so both come out at their drawn size.
    const m = measureDxf(sheet.body)
    expect(m.outer).toHaveLength(1)
    expect(m.holes).toHaveLength(1)
    const size = (b: number[]) => [b[2]! - b[0]!, b[3]! - b[1]!]
    for (const v of size(m.outer[0]!)) expect(v).toBeCloseTo(20.2, 2)
    for (const v of size(m.holes[0]!)) expect(v).toBeCloseTo(9.8, 2)
    const off = measureDxf((await file(operator, `/api/jobs/${job}/cut-sheet.dxf?kerf=0`)).body)
    for (const v of size(off.outer[0]!)) expect(v).toBeCloseTo(20, 2)
    for (const v of size(off.holes[0]!)) expect(v).toBeCloseTo(10, 2)
  })

  it('pack a mixed batch with no two copies overlapping, all inside the margin, and weeding lines at least the clearance from every copy', async () => {
    const made = (await operator.post('/api/batches', { jobIds: [await queued(program, square.revisionId, 20, 5), await queued(program, ell.revisionId, 30, 4)] })).body
    const margin = 7, clearance = 1.5
    const q = `margin=${margin}&gap=2&weeding=1&clearance=${clearance}&spacing=15&labels=ids`
    const detail = (await operator.get(`/api/batches/${made.id}?${q}`)).body
    expect(detail.layout.fits).toBe(true)
    expect(detail.layout.sheets).toBe(1)
    const sheet = await file(operator, `/api/batches/${made.id}/cut-sheet.dxf?${q}`)
    expect(sheet.status, sheet.body.slice(0, 300)).toBe(200)
    const m = measureDxf(sheet.body)
    expect(m.outer).toHaveLength(9)
    expect(m.holes).toHaveLength(5)
    expect(m.overlaps).toBe(0)
    // The film's sheet is 300 × 200 mm (the fixture's).
    expect(m.bounds[0]).toBeGreaterThanOrEqual(margin - 1e-6)
    expect(m.bounds[1]).toBeGreaterThanOrEqual(margin - 1e-6)
    expect(m.bounds[2]).toBeLessThanOrEqual(300 - margin + 1e-6)
    expect(m.bounds[3]).toBeLessThanOrEqual(200 - margin + 1e-6)
    expect(m.weedingLines).toBeGreaterThan(0)
    expect(m.weedingDistance!).toBeGreaterThanOrEqual(clearance - 1e-6)
    // The SVG: each design defined once, each copy placed by reference, named job-copy.
    const svg = await file(operator, `/api/batches/${made.id}/cut-sheet.svg?${q}`)
    expect(svg.body.match(/<path id="dw-design-/g)).toHaveLength(2)
    expect(svg.body.match(/<use id="dw-copy-\d+-\d+"/g)).toHaveLength(9)
  })

  it('are built once and read back from object storage by content; a change of option builds new ones', async () => {
    const job = await queued(program, ell.revisionId, 25, 2)
    const first = await file(operator, `/api/jobs/${job}/cut-sheet.svg?gap=4`)
    expect(first.status).toBe(200)
    expect(first.from).toBe('built')
    const again = await file(operator, `/api/jobs/${job}/cut-sheet.svg?gap=4`)
    expect(again.from).toBe('store')
    expect(again.body).toBe(first.body)
    // The other format was built with it.
    expect((await file(operator, `/api/jobs/${job}/cut-sheet.dxf?gap=4`)).from).toBe('store')
    expect((await file(operator, `/api/jobs/${job}/cut-sheet.svg?gap=5`)).from).toBe('built')
    expect((await allKeys()).filter((k) => k.startsWith('cut-sheets/')).length).toBeGreaterThanOrEqual(6)
    // Another job (a new quantity) is another key.
    await testDb().updateTable('job').set({ quantity: 3 }).where('id', '=', job).execute()
    const changed = await file(operator, `/api/jobs/${job}/cut-sheet.svg?gap=4`)
    expect(changed.from).toBe('built')
    expect(changed.body.match(/<use id="dw-copy-/g)).toHaveLength(3)
  })

  it('are removed by the sweep once nothing can ask for them: jobs changed, cancelled, cut, a batch changed, or too old; a current sheet stays', async () => {
    // The sweep runs here, in the test's process, against the run's PostgreSQL and s3rver.
    const c = inject('s3')
    configurePlatform({
      databaseUrl: '', s3: { ...c, region: 'us-east-1', forcePathStyle: true }, smtpUrl: '', mailFrom: 'Decalwright <decalwright@tests.example>', mailOutboxDir: '', baseUrl: 'http://decalwright.test',
    })
    const db = testDb()
    const sheetKeys = async () => (await allKeys()).filter((k) => k.startsWith('cut-sheets/'))
    const before = new Set(await sheetKeys())
    /** Asks for a sheet and answers the one new set of kept files it made. */
    const newSet = async (path: string) => {
      const r = await file(operator, path)
      expect(r.status, r.body.slice(0, 200)).toBe(200)
      const keys = await sheetKeys()
      const fresh = [...new Set(keys.filter((k) => !before.has(k)).map((k) => k.split('/')[1]!))]
      for (const k of keys) before.add(k)
      expect(fresh).toHaveLength(1)
      return fresh[0]!
    }
    const kept = async (set: string) => (await allKeys()).filter((k) => k.startsWith(`cut-sheets/${set}/`)).length

    const current = await queued(program, square.revisionId, 22, 2)
    const currentSet = await newSet(`/api/jobs/${current}/cut-sheet.svg?gap=3.5`)
    const changed = await queued(program, square.revisionId, 22, 2)
    const changedSet = await newSet(`/api/jobs/${changed}/cut-sheet.svg?gap=3.5`)
    await db.updateTable('job').set({ quantity: 4 }).where('id', '=', changed).execute()
    const cancelled = await queued(program, square.revisionId, 22, 1)
    const cancelledSet = await newSet(`/api/jobs/${cancelled}/cut-sheet.dxf?gap=3.5`)
    await db.updateTable('job').set({ state: 'cancelled', cancelled_at: new Date(), cancel_reason: 'test' }).where('id', '=', cancelled).execute()
    const [a, b] = [await queued(program, square.revisionId, 22, 1), await queued(program, ell.revisionId, 30, 1)]
    const batch = (await operator.post('/api/batches', { jobIds: [a, b] })).body as { id: number }
    const batchSet = await newSet(`/api/batches/${batch.id}/cut-sheet.svg?gap=3.5`)
    expect((await operator.request('DELETE', `/api/batches/${batch.id}/jobs/${b}`)).status).toBe(200)
    const cut = await queued(program, ell.revisionId, 30, 1)
    const cutSet = await newSet(`/api/jobs/${cut}/cut-sheet.svg?gap=3.5`)
    expect((await operator.post(`/api/jobs/${cut}/state`, { state: 'cut', sheetsUsed: 0 })).status, 'mark cut').toBeLessThan(300)
    // Each set was made (newSet saw it appear); the app's own housekeeping may already have swept
    // the ones nothing can ask for, but never the current one.
    expect(await kept(currentSet)).toBe(3)

    await sweepKeptSheets(db)
    expect(await kept(currentSet)).toBe(3)
    for (const set of [changedSet, cancelledSet, batchSet, cutSet]) expect(await kept(set), set).toBe(0)
    // Still read back from the store, not built again.
    expect((await file(operator, `/api/jobs/${current}/cut-sheet.dxf?gap=3.5`)).from).toBe('store')

    // Past the stated age even a current sheet goes; asking again builds it anew.
    await sweepKeptSheets(db, { now: new Date(Date.now() + (KEPT_SHEET_MAX_AGE_S + 60) * 1000) })
    expect(await kept(currentSet)).toBe(0)
    expect((await file(operator, `/api/jobs/${current}/cut-sheet.svg?gap=3.5`)).from).toBe('built')
  })
})
