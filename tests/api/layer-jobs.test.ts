// A layered decal from placement to cut sheet: a generated two-colour plate placed with a film
// per layer queues one order of one job per layer; each layer's cut sheet cuts that layer with
// the registration marks in the same place relative to the design's copy. Names are invented.
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'
import { svgPathProperties } from 'svg-path-properties'
import { beforeAll, describe, expect, it } from 'vitest'
import { hashPassword } from '../../server/platform/passwords'
import { MOVE_ALLOWANCE_S } from '../../shared/utils/cut-time'
import type { ApiClient } from '../support/client'
import { signedIn } from '../support/client'
import { testDb } from '../support/db'
import { addRobot, buildProgram, type ProgramFixture } from '../support/fixtures'
import { mailTo } from '../support/mail'

const PYTHON = '/usr/bin/python3'
const PASSWORD = 'fixture-password-123'
const stamp = Date.now().toString(36)
/** A registration mark's ring is 6 mm across (DEFAULT_MARKS); every piece of the plate itself is far larger. */
const MARK_MAX_MM = 7

let program: ProgramFixture
let other: ProgramFixture
let mentor: ApiClient
let operator: ApiClient
let student: ApiClient
let robotId: number
let otherRobot: number
let revisionId: number
let revisionWidth: number
const films = {} as Record<'red' | 'white', number>

const filmBody = (name: string, colour: string, colourHex: string) => ({
  name, polymerCode: 'PET', colour, colourHex, opacity: 'opaque', thicknessMm: 0.08,
  sheetWidthMm: 300, sheetHeightMm: 300, minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1, sheetsOnHand: 20,
})

async function file(c: ApiClient, path: string) {
  const r = await fetch(new URL(path, c.baseUrl), { headers: { cookie: [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
  return { status: r.status, body: await r.text() }
}

/** Centres of the small closed outlines (the marks' rings and dots) of a DXF, read by Debian's ezdxf. */
function dxfSmallCentres(dxf: string): number[][] {
  const hint = 'Install it with: apt-get install python3-ezdxf'
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: the cut sheet is checked with ezdxf. ${hint}`)
  const script = `
import sys, io, json, ezdxf
doc = ezdxf.read(io.StringIO(sys.stdin.buffer.read().decode('ascii'), newline=None))
out = []
for e in doc.modelspace().query('POLYLINE'):
    if e.dxf.layer != 'DW_CUT': continue
    xs = [p[0] for p in e.points()]; ys = [p[1] for p in e.points()]
    if max(xs) - min(xs) < ${MARK_MAX_MM} and max(ys) - min(ys) < ${MARK_MAX_MM}:
        out.append([(min(xs) + max(xs)) / 2, (min(ys) + max(ys)) / 2, max(xs) - min(xs)])
print(json.dumps(sorted(out)))
`
  try {
    return JSON.parse(execFileSync(PYTHON, ['-c', script], { input: dxf, maxBuffer: 64 * 1024 * 1024 }).toString('utf8'))
  } catch (e) {
    throw new Error(`ezdxf could not read the sheet (${(e as Error).message}). ${hint}`)
  }
}

/**
 * Centres of the small closed outlines of the design a sheet's SVG defines (in the copy's own
 * coordinates), read by svg-path-properties (npm): every subpath sampled for its box.
 */
function svgDesignSmallCentres(svg: string): number[][] {
  const d = /<path id="dw-design-[^"]*"[^>]*\bd="([^"]+)"/.exec(svg)?.[1]
  if (!d) throw new Error('The sheet defines no design path.')
  const out: number[][] = []
  for (const sub of d.split(/(?=M)/).filter((s) => s.trim())) {
    const props = new svgPathProperties(sub)
    let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity
    const total = props.getTotalLength()
    for (let s = 0; s <= total; s += Math.max(total / 400, 0.01)) {
      const p = props.getPointAtLength(s)
      minX = Math.min(minX, p.x); maxX = Math.max(maxX, p.x); minY = Math.min(minY, p.y); maxY = Math.max(maxY, p.y)
    }
    if (maxX - minX < MARK_MAX_MM && maxY - minY < MARK_MAX_MM) out.push([(minX + maxX) / 2, (minY + maxY) / 2, maxX - minX])
  }
  return byMark(out)
}

/**
 * Rings before dots, then by place to the nearest millimetre: a ring's box centre sits a little
 * off its dot's (its notch), so ordering by exact coordinates could pair a ring with a dot.
 */
function byMark(centres: number[][]): number[][] {
  const key = (c: number[]) => [c[2]! > 3 ? 0 : 1, Math.round(c[0]!), Math.round(c[1]!)]
  return centres.sort((a, b) => {
    const ka = key(a), kb = key(b)
    return ka[0]! - kb[0]! || ka[1]! - kb[1]! || ka[2]! - kb[2]!
  })
}

beforeAll(async () => {
  const db = testDb()
  const passwordHash = await hashPassword(PASSWORD)
  program = await buildProgram(db, { passwordHash })
  other = await buildProgram(db, { passwordHash })
  mentor = await signedIn(program.emails.get(program.mentor)!, PASSWORD)
  operator = await signedIn(program.emails.get(program.teams[0].operator)!, PASSWORD)
  student = await signedIn(program.emails.get(program.teams[0].student)!, PASSWORD)
  for (const [key, colour, hex] of [['red', 'Signal red', '#c0282d'], ['white', 'Bright white', '#fafafa']] as const) {
    const r = await mentor.post('/api/films', filmBody(`Layer ${colour} ${stamp}`, colour, hex))
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    films[key] = r.body.id
  }
  const profile = await mentor.post('/api/rule-profiles', { presetKey: 'ftc-2025-26' })
  expect((await mentor.put('/api/program/rule-profile', { ruleProfileId: profile.body.id })).status).toBe(200)
  const made = await student.post(`/api/teams/${program.teams[0].id}/plates`, { teamNumber: '3141', numeralHeightMm: 50, backgroundColour: 'red' })
  expect(made.status, JSON.stringify(made.body)).toBe(201)
  revisionId = made.body.artworks[0].revisionId
  expect((await student.post(`/api/revisions/${revisionId}/submit`)).status).toBe(200)
  expect((await mentor.post(`/api/revisions/${revisionId}/review`, { decision: 'approve' })).status).toBe(200)
  revisionWidth = (await mentor.get(`/api/revisions/${revisionId}`)).body.widthMm
  robotId = (await mentor.post('/api/robots', { teamId: program.teams[0].id, name: `Layer bot ${stamp}`, season: '2025–26' })).body.id
  otherRobot = await addRobot(db, other.teams[0].id)
})

/**
 * Every message the SMTP fake received for `email`, once the app's outbox holds none still
 * waiting for that address (mail goes out after commit; the fake keeps each as it arrives).
 */
async function deliveredTo(email: string) {
  const deadline = Date.now() + 20_000
  for (;;) {
    const waiting = await testDb().selectFrom('mail_outbox').select('id').where('to_email', '=', email).where('sent_at', 'is', null).execute()
    if (waiting.length === 0) return mailTo(email)
    if (Date.now() > deadline) throw new Error(`${waiting.length} messages to ${email} still waiting in the outbox`)
    await new Promise((r) => setTimeout(r, 100))
  }
}

const placementCount = async () => (await testDb().selectFrom('placement').select((eb) => eb.fn.countAll<number>().as('n'))
  .where('robot_id', '=', robotId).executeTakeFirstOrThrow()).n

describe('placing a layered decal', () => {
  it('offers each layer with its colour and the cleared films nearest it first', async () => {
    const r = await mentor.get(`/api/robots/${robotId}/approved-revisions`)
    expect(r.status).toBe(200)
    const rev = r.body.find((x: { revisionId: number }) => x.revisionId === revisionId)
    expect(rev.layers.map((l: { name: string }) => l.name)).toEqual(['red background', 'white numerals'])
    // Red ink: the red film first; white ink: the white film first (CIEDE2000, checked against
    // scikit-image in tests/unit/server/robots/film-colours.test.ts). PVC and the unapproved film never.
    expect(rev.layers[0].suggestedFilmIds[0]).toBe(films.red)
    expect(rev.layers[1].suggestedFilmIds[0]).toBe(films.white)
    for (const l of rev.layers) expect(l.suggestedFilmIds).not.toContain(program.films.pvc)
    for (const l of rev.layers) expect(l.suggestedFilmIds).not.toContain(program.films.pu)
  })

  it('refuses PVC or an unapproved film for any layer in a sentence naming the layer, and stores nothing', async () => {
    const before = await placementCount()
    const base = { robotId, revisionId, spot: 'front bumper', side: 'front', widthMm: revisionWidth, quantity: 1, spares: 0 }
    const pvc = await mentor.post('/api/placements', { ...base, layerFilmIds: [films.red, program.films.pvc] })
    expect(pvc.status).toBe(422)
    expect(pvc.body.message).toMatch(/^Layer 2 \(white numerals\): /)
    expect(pvc.body.data.fieldErrors.layerFilmIds[0]).toBe('Never cut this film.')
    const pu = await mentor.post('/api/placements', { ...base, layerFilmIds: [program.films.pu, films.white] })
    expect(pu.status).toBe(422)
    expect(pu.body.message).toMatch(/^Layer 1 \(red background\): .*approval/)
    const short = await mentor.post('/api/placements', { ...base, layerFilmIds: [films.red] })
    expect(short.status).toBe(400)
    expect(short.body.message).toMatch(/2 layers/)
    expect(await placementCount()).toBe(before)
  })

  it('answers 404 for another program\'s robot, and never lets another program see the jobs', async () => {
    const r = await mentor.post('/api/placements', { robotId: otherRobot, revisionId, layerFilmIds: [films.red, films.white], spot: 'x', widthMm: 100, quantity: 1 })
    expect(r.status).toBe(404)
    const stranger = await signedIn(other.emails.get(other.teams[0].operator)!, PASSWORD)
    const mine = await testDb().selectFrom('job').select('id').orderBy('id', 'desc').limit(1).executeTakeFirst()
    if (mine) expect((await stranger.get(`/api/jobs/${mine.id}`)).status).toBe(404)
  })

  let jobs: { id: number; layer: number; orderId: number }[]
  let placementId: number
  it('queues one order of one job per layer, each in its layer\'s film', async () => {
    const r = await mentor.post('/api/placements', { robotId, revisionId, layerFilmIds: [films.red, films.white], spot: 'front bumper', side: 'front', widthMm: revisionWidth, quantity: 1, spares: 1 })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    placementId = r.body.id
    expect(r.body.layers.map((l: { name: string; film: { id: number } }) => [l.name, l.film.id])).toEqual([['red background', films.red], ['white numerals', films.white]])
    jobs = r.body.jobs
    expect(jobs.map((j) => j.layer)).toEqual([0, 1])
    expect(new Set(jobs.map((j) => j.orderId)).size).toBe(1)
    const rows = await testDb().selectFrom('job').select(['id', 'film_id', 'layer', 'quantity']).where('placement_id', '=', placementId).orderBy('layer').execute()
    expect(rows.map((j) => [j.layer, j.film_id, j.quantity])).toEqual([[0, films.red, 2], [1, films.white, 2]])
    const job = (await operator.get(`/api/jobs/${jobs[1]!.id}`)).body
    expect(job.layer).toMatchObject({ position: 1, count: 2, name: 'white numerals' })
    expect(job.layer.order.map((j: { id: number }) => j.id)).toEqual(jobs.map((j) => j.id))
    expect(job.film.id).toBe(films.white)
  })

  it('mails the operators once for the order, listing every layer with its film, copies and a link to its job', async () => {
    const email = program.emails.get(program.teams[0].operator)!
    const robotName = `Layer bot ${stamp}`
    const mails = (await deliveredTo(email)).filter((m) => /^New cut job/.test(m.subject ?? '') && (m.subject ?? '').includes(robotName))
    expect(mails.map((m) => m.subject)).toEqual([expect.stringMatching(/^New cut job: 2 × Plate 3141: .* in 2 layers$/)])
    const text = mails[0]!.text ?? ''
    expect(text).toContain(`Layer 1 of 2 (bottom): red background, 2 copies in Layer Signal red ${stamp}`)
    expect(text).toContain(`Layer 2 of 2: white numerals, 2 copies in Layer Bright white ${stamp}`)
    for (const j of jobs) expect(text).toContain(`/lab/jobs/${j.id}`)
  })

  it('a layer job\'s cut length and time include its registration marks, as measured on the layer\'s own SVG', async () => {
    const revision = (await mentor.get(`/api/revisions/${revisionId}`)).body
    for (const j of jobs) {
      const d = (await operator.get(`/api/jobs/${j.id}`)).body
      const layer = d.layer.layers.find((l: { position: number }) => l.position === d.layer.position)
      const svg = await file(operator, layer.vectorUrl)
      expect(svg.status).toBe(200)
      // Every outline of the layer's vector as cut, the marks included, measured by
      // svg-path-properties (npm), a general-purpose SVG path-length library: the paths' length,
      // and an outline wherever a part does not start where the last one ended.
      const mmPerUnit = Number(/\bwidth="([\d.]+)mm"/.exec(svg.body)![1]) / Number(/\bviewBox="[\d.-]+ [\d.-]+ ([\d.]+)/.exec(svg.body)![1])
      let lengthMm = 0, outlines = 0
      for (const [, path] of svg.body.matchAll(/<path\b[^>]*\bd="([^"]+)"/g)) {
        const props = new svgPathProperties(path!)
        lengthMm += props.getTotalLength() * mmPerUnit
        let last: { x: number; y: number } | null = null
        for (const part of props.getParts()) {
          if (!last || Math.hypot(part.start.x - last.x, part.start.y - last.y) > 1e-6) outlines++
          last = part.end
        }
      }
      const scale = d.placement.widthMm / revisionWidth
      // The layer's own measurements leave the marks out; the job adds them: three rings 6 mm
      // across with their dots, over 30 mm of cut each, far beyond the tolerance below.
      const design = revision.layers[d.layer.position].measurements.cutLengthMm * scale
      expect(d.cutLengthMm - design).toBeGreaterThan(90)
      const { laserSpeedMmS: speed, laserPasses: passes } = d.film
      // Per copy, within 0.1 % of the measured path (the SVG's coordinates are rounded to 0.01 mm).
      expect(Math.abs(d.cutLengthMm - lengthMm * scale)).toBeLessThanOrEqual(0.001 * lengthMm * scale)
      // The estimate as shared/utils/cut-time.ts states it, worked from the measured figures.
      const expected = (lengthMm * scale * d.quantity * passes) / speed + outlines * d.quantity * passes * MOVE_ALLOWANCE_S
      expect(Math.abs(d.estimate.seconds - expected)).toBeLessThanOrEqual(0.001 * expected)
      expect(d.estimate.how).toMatch(/the registration marks' \d+ mm included/)
    }
  })

  it('cuts each layer\'s own vector with the registration marks at the same place relative to the design\'s copy', async () => {
    // The layout with the same options as the files: no kerf, so each copy's box is its drawn box.
    const details = await Promise.all(jobs.map(async (j) => (await operator.get(`/api/jobs/${j.id}?kerf=0`)).body))
    const svgs = await Promise.all(jobs.map((j) => file(operator, `/api/jobs/${j.id}/cut-sheet.svg?kerf=0`)))
    const dxfs = await Promise.all(jobs.map((j) => file(operator, `/api/jobs/${j.id}/cut-sheet.dxf?kerf=0`)))
    for (const f of [...svgs, ...dxfs]) expect(f.status).toBe(200)
    // The layers differ (background against numerals) ...
    expect(svgs[0]!.body).not.toBe(svgs[1]!.body)
    // ... and each carries three marks (a ring and a dot each) in the design's own coordinates.
    const inDesign = svgs.map((s) => svgDesignSmallCentres(s.body))
    expect(inDesign[0]).toHaveLength(6)
    expect(inDesign[1]).toHaveLength(inDesign[0]!.length)
    inDesign[1]!.forEach((c, i) => {
      expect(Math.abs(c[0]! - inDesign[0]![i]![0]!)).toBeLessThanOrEqual(0.01)
      expect(Math.abs(c[1]! - inDesign[0]![i]![1]!)).toBeLessThanOrEqual(0.01)
    })
    // In the DXF, on the sheet (y up from the sheet's lower edge): relative to each copy's box in
    // the job's layout (y down), every copy of every layer has its marks in the same place.
    const perCopy: number[][][][] = dxfs.map((f, k) => {
      const d = details[k]!
      const copies = d.layout.copies.filter((c: { sheet: number }) => c.sheet === 1)
      const found = copies.map(() => [] as number[][])
      for (const [x, yUp, w] of dxfSmallCentres(f.body)) {
        const y = d.film.sheetHeightMm - yUp!
        const i = copies.findIndex((c: { box: { x: number; y: number; width: number; height: number } }) =>
          x! >= c.box.x && x! <= c.box.x + c.box.width && y >= c.box.y && y <= c.box.y + c.box.height)
        expect(i, `a mark at (${x}, ${y}) outside every copy`).toBeGreaterThanOrEqual(0)
        found[i]!.push([x! - copies[i].box.x, y - copies[i].box.y, w!])
      }
      return found.map(byMark)
    })
    expect(perCopy[0]).toHaveLength(2)
    const first = perCopy[0]![0]!
    expect(first).toHaveLength(6)
    for (const layer of perCopy) {
      for (const marks of layer) {
        expect(marks).toHaveLength(6)
        marks.forEach((c, i) => {
          expect(Math.abs(c[0]! - first[i]![0]!)).toBeLessThanOrEqual(0.01)
          expect(Math.abs(c[1]! - first[i]![1]!)).toBeLessThanOrEqual(0.01)
        })
      }
    }
    // And where the design's own coordinates put them (the SVG's definition), for unturned copies.
    if (!details[0]!.layout.turned) {
      first.forEach((c, i) => {
        expect(Math.abs(c[0]! - inDesign[0]![i]![0]!)).toBeLessThanOrEqual(0.01)
        expect(Math.abs(c[1]! - inDesign[0]![i]![1]!)).toBeLessThanOrEqual(0.01)
      })
    }
  })

  it('in different films, the layers never share a batch', async () => {
    const r = await operator.post('/api/batches', { jobIds: jobs.map((j) => j.id) })
    expect(r.status).toBeGreaterThanOrEqual(400)
    expect(r.status).toBeLessThan(500)
  })

  it('a reprint of one damaged layer queues that layer alone; a failed cut recuts only its layer, in the same order', async () => {
    const one = await student.post(`/api/placements/${placementId}/reprints`, { quantity: 1, reason: 'numerals scraped', layer: 1 })
    expect(one.status, JSON.stringify(one.body)).toBe(201)
    expect(one.body.jobIds).toHaveLength(1)
    const whole = await student.post(`/api/placements/${placementId}/reprints`, { quantity: 1, reason: 'torn off' })
    expect(whole.body.jobIds).toHaveLength(2)
    const made = await testDb().selectFrom('job').select(['id', 'layer', 'film_id', 'order_id']).where('id', 'in', [...one.body.jobIds, ...whole.body.jobIds]).orderBy('id').execute()
    expect(made.map((j) => [j.layer, j.film_id])).toEqual([[1, films.white], [0, films.red], [1, films.white]])
    const failed = await operator.post(`/api/jobs/${jobs[1]!.id}/failure`, { failure: 'lifted', sheetsUsed: 1 })
    expect(failed.status, JSON.stringify(failed.body)).toBe(200)
    const recut = await testDb().selectFrom('job').select(['layer', 'film_id', 'order_id', 'kind']).where('recut_of', '=', jobs[1]!.id).executeTakeFirstOrThrow()
    expect(recut).toEqual({ layer: 1, film_id: films.white, order_id: jobs[1]!.orderId, kind: 'recut' })
  })

  it('counts spares by the bottom layer: cutting the numerals adds none, cutting the background adds its copies', async () => {
    const onHand = async () => (await testDb().selectFrom('placement').select('spares_on_hand').where('id', '=', placementId).executeTakeFirstOrThrow()).spares_on_hand
    const before = await onHand()
    const recut = await testDb().selectFrom('job').select('id').where('recut_of', '=', jobs[1]!.id).executeTakeFirstOrThrow()
    expect((await operator.post(`/api/jobs/${recut.id}/state`, { state: 'cut', sheetsUsed: 1 })).status).toBe(200)
    expect(await onHand()).toBe(before)
    expect((await operator.post(`/api/jobs/${jobs[0]!.id}/state`, { state: 'cut', sheetsUsed: 1 })).status).toBe(200)
    expect(await onHand()).toBe(before + 2)
  })

  it('editing the placement queues the extra copies as one order of a job per layer, each in its film', async () => {
    const r = await mentor.patch(`/api/placements/${placementId}`, { quantity: 2 })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body.queuedJobIds).toHaveLength(2)
    const made = await testDb().selectFrom('job').select(['layer', 'film_id', 'order_id', 'kind', 'quantity']).where('id', 'in', r.body.queuedJobIds).orderBy('layer').execute()
    expect(made.map((j) => [j.kind, j.layer, j.film_id, j.quantity])).toEqual([['extra', 0, films.red, 1], ['extra', 1, films.white, 1]])
    expect(made[0]!.order_id).toBe(made[1]!.order_id)
  })

  it('the event kit mails the operators once for every job it queues', async () => {
    const kitRobot = (await mentor.post('/api/robots', { teamId: program.teams[0].id, name: `Kit bot ${stamp}`, season: '2025–26' })).body.id
    for (const [side, spot] of [['front', 'front bumper'], ['back', 'back bumper']]) {
      const p = await mentor.post('/api/placements', { robotId: kitRobot, revisionId, layerFilmIds: [films.red, films.white], spot, side, widthMm: revisionWidth, quantity: 1, spares: 1 })
      expect(p.status, JSON.stringify(p.body)).toBe(201)
    }
    const kit = await student.post(`/api/robots/${kitRobot}/event-kit`)
    expect(kit.status, JSON.stringify(kit.body)).toBe(201)
    // Two plates of two layers each: four reprint jobs, in one request.
    expect(kit.body.jobIds).toHaveLength(4)
    const email = program.emails.get(program.teams[0].operator)!
    const mine = (await deliveredTo(email)).filter((m) => (m.subject ?? '').includes(`Kit bot ${stamp}`))
    expect(mine.filter((m) => /^New cut job/.test(m.subject ?? ''))).toHaveLength(2)
    const kitMails = mine.filter((m) => /^Reprint/.test(m.subject ?? ''))
    expect(kitMails.map((m) => m.subject)).toEqual([`Reprint: 4 jobs for Kit bot ${stamp}`])
    const text = kitMails[0]!.text ?? ''
    for (const id of kit.body.jobIds as number[]) expect(text).toContain(`/lab/jobs/${id}`)
    expect(text).toContain('for the back bumper, layer 2 of 2: white numerals: 1 copy in Layer Bright white')
  })

  it('removing the placement cancels every layer\'s queued jobs', async () => {
    const r = await mentor.request('DELETE', `/api/placements/${placementId}`, { reason: 'new bumper' })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    const left = await testDb().selectFrom('job').select('id').where('placement_id', '=', placementId).where('state', '=', 'queued').execute()
    expect(left).toEqual([])
  })
})
