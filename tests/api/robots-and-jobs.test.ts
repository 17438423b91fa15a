import { describe, expect, it, beforeAll } from 'vitest'
import DxfParser from 'dxf-parser'
import { allPages, ApiClient, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { waitForMail } from '../support/mail'
import { uploadArtwork } from '../support/upload'

let student: ApiClient
let mentor: ApiClient
let operator: ApiClient
let wrens: number
let approvedRevision: { id: number; artworkId: number; widthMm: number; heightMm: number; measurements: any }
let pet: { id: number; sheet_width_mm: number; sheet_height_mm: number }
let pvc: { id: number }

async function text(c: ApiClient, path: string) {
  const r = await fetch(new URL(path, c.baseUrl), { headers: { cookie: [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
  return { status: r.status, type: r.headers.get('content-type'), disposition: r.headers.get('content-disposition'), sheets: r.headers.get('x-sheet-count'), body: await r.text() }
}

beforeAll(async () => {
  const db = testDb()
  wrens = (await db.selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  pet = await db.selectFrom('film').select(['id', 'sheet_width_mm', 'sheet_height_mm']).where('name', '=', 'Matte black polyester film').executeTakeFirstOrThrow()
  pvc = await db.selectFrom('film').select('id').where('polymer_code', '=', 'PVC').executeTakeFirstOrThrow()
  student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
  operator = await signedIn(DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD)
  const up = await uploadArtwork(student, { file: await drawing('png', 600, 400), title: `Gear wren ${Date.now()}`, teamId: wrens, widthMm: 60 })
  await student.post(`/api/revisions/${up.body.revision.id}/submit`)
  approvedRevision = (await mentor.post(`/api/revisions/${up.body.revision.id}/review`, { decision: 'approve' })).body
})

describe('robots, placements, the cut queue and cut sheets', () => {
  let robotId: number
  let placementId: number
  let jobId: number

  it('a mentor adds a robot; a student may not', async () => {
    expect((await student.post('/api/robots', { teamId: wrens, name: 'Nope', season: '2026–27' })).status).toBe(403)
    const r = await mentor.post('/api/robots', { teamId: wrens, name: `Marlin ${Date.now()}`, season: '2026–27' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    robotId = r.body.id
    expect((await allPages(student, `/api/robots?teamId=${wrens}`)).map((x: any) => x.id)).toContain(robotId)
  })

  it('refuses PVC film for a placement, with the register\'s reason, and a revision that is not approved', async () => {
    const base = { robotId, revisionId: approvedRevision.id, spot: 'left side panel', widthMm: 50, quantity: 2, spares: 1 }
    const r = await mentor.post('/api/placements', { ...base, filmId: pvc.id })
    expect(r.status).toBe(422)
    expect(r.body.message).toMatch(/hydrogen chloride/)
    const draft = await uploadArtwork(student, { file: await drawing('png', 300, 200), title: 'Draft only', teamId: wrens })
    const d = await mentor.post('/api/placements', { ...base, revisionId: draft.body.revision.id, filmId: pet.id })
    expect(d.status).toBe(409)
    expect((await student.post('/api/placements', { ...base, filmId: pet.id })).status).toBe(403)
  })

  it('places the approved revision in chlorine-free film; a job is queued and the operators are mailed', async () => {
    const r = await mentor.post('/api/placements', { robotId, revisionId: approvedRevision.id, filmId: pet.id, spot: 'left side panel', widthMm: 50, quantity: 2, spares: 1 })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    placementId = r.body.id
    expect(r.body).toMatchObject({ spot: 'left side panel', widthMm: 50, quantity: 2, spares: 1, film: { id: pet.id } })
    expect(r.body.jobs).toEqual([expect.objectContaining({ kind: 'initial', quantity: 3, state: 'queued' })])
    jobId = r.body.jobs[0].id
    const mail = await waitForMail(DEMO_ACCOUNTS.operator.email, /New cut job: 3 × Gear wren/)
    expect(mail.text).toContain(`/lab/jobs/${jobId}`)
    const robot = (await student.get(`/api/robots/${robotId}`)).body
    expect(robot.placements[0].revision.id).toBe(approvedRevision.id)
  })

  it('shows the job to operators with its estimate and layout; a student cannot work the queue', async () => {
    expect((await student.get('/api/jobs')).status).toBe(403)
    const list = await allPages(operator, `/api/jobs?state=queued&filmId=${pet.id}`)
    expect(list.map((j: any) => j.id)).toContain(jobId)
    const job = (await operator.get(`/api/jobs/${jobId}`)).body
    const scale = 50 / approvedRevision.widthMm
    expect(job.cutLengthMm).toBeCloseTo(approvedRevision.measurements.cutLengthMm * scale, 6)
    // Estimate per shared/utils/cut-time.ts: length × passes ÷ speed + 0.5 s per outline per pass.
    const outlines = approvedRevision.measurements.pieces + approvedRevision.measurements.holes
    expect(job.estimate.seconds).toBeCloseTo((job.cutLengthMm * 3 * job.film.laserPasses) / job.film.laserSpeedMmS + outlines * 3 * job.film.laserPasses * 0.5, 6)
    expect(job.layout.fits).toBe(true)
    expect(job.layout.sheets).toBe(1)
  })

  it('downloads the cut sheet as SVG in millimetres, mirrored on request, and the same geometry as DXF', async () => {
    const svg = await text(operator, `/api/jobs/${jobId}/cut-sheet.svg?frame=2`)
    expect(svg.status, svg.body).toBe(200)
    expect(svg.type).toBe('image/svg+xml')
    expect(svg.disposition).toMatch(/attachment; filename="job-\d+-gear-wren-\d+-r1\.svg"/)
    // W3C SVG 1.1 §7: width/height with unit identifiers; the viewBox maps 1 user unit to 1 mm.
    expect(svg.body).toMatch(new RegExp(`width="${pet.sheet_width_mm}mm" height="${pet.sheet_height_mm}mm"`))
    expect(svg.body).toMatch(new RegExp(`viewBox="0 0 ${pet.sheet_width_mm} ${pet.sheet_height_mm}"`))
    // Each copy is named by its job and number (job-copy), so pieces can be sorted after weeding.
    expect(svg.body.match(/id="dw-copy-[\d-]+"/g) ?? []).toEqual([1, 2, 3].map((n) => `id="dw-copy-${jobId}-${n}"`))
    expect((svg.body.match(/id="dw-frame-[\d-]+"/g) ?? []).length).toBe(3)
    const mirrored = await text(operator, `/api/jobs/${jobId}/cut-sheet.svg?mirror=1`)
    expect(mirrored.body).not.toBe((await text(operator, `/api/jobs/${jobId}/cut-sheet.svg`)).body)

    // Kerf 0: the cut path is the drawn outline itself.
    const dxf = await text(operator, `/api/jobs/${jobId}/cut-sheet.dxf?kerf=0`)
    expect(dxf.status).toBe(200)
    const parsed = new DxfParser().parseSync(dxf.body) as any
    expect(parsed.header.$INSUNITS).toBe(4) // millimetres (DXF reference, header variables)
    const polylines = parsed.entities.filter((e: any) => e.type === 'POLYLINE')
    const outlines = approvedRevision.measurements.pieces + approvedRevision.measurements.holes
    expect(polylines).toHaveLength(3 * outlines)
    let total = 0
    for (const p of polylines) {
      expect(p.shape).toBe(true) // closed
      const v = p.vertices
      for (let i = 0; i < v.length; i++) total += Math.hypot(v[(i + 1) % v.length].x - v[i].x, v[(i + 1) % v.length].y - v[i].y)
    }
    const job = (await operator.get(`/api/jobs/${jobId}`)).body
    // Flattened within 0.05 mm, the DXF's length stays within 0.1 % of the vector's cut length.
    expect(Math.abs(total - 3 * job.cutLengthMm) / (3 * job.cutLengthMm)).toBeLessThan(0.001)
    expect((await text(student, `/api/jobs/${jobId}/cut-sheet.svg`)).status).toBe(403)
  })

  it('moves the job queued → cut → applied, with who and when, forward only', async () => {
    expect((await operator.post(`/api/jobs/${jobId}/state`, { state: 'applied' })).status).toBe(409)
    const cut = await operator.post(`/api/jobs/${jobId}/state`, { state: 'cut' })
    expect(cut.body).toMatchObject({ state: 'cut', cutBy: DEMO_ACCOUNTS.operator.name })
    const applied = await operator.post(`/api/jobs/${jobId}/state`, { state: 'applied' })
    expect(applied.body).toMatchObject({ state: 'applied', appliedBy: DEMO_ACCOUNTS.operator.name })
    expect(applied.body.history.map((h: any) => h.action)).toEqual(['queue-job', 'mark-cut', 'mark-applied'])
    // 3 copies cut, 2 on the robot (the placement's count): 1 spare on the shelf.
    expect(applied.body).toMatchObject({ appliedCount: 2, sheetsUsed: 1, placement: { sparesOnHand: 1 } })
    expect((await operator.post(`/api/jobs/${jobId}/state`, { state: 'cut' })).status).toBe(409)
  })

  it('a student asks for a reprint of exactly that revision; the operator sees it queued', async () => {
    const bad = await student.post(`/api/placements/${placementId}/reprints`, { quantity: 0, reason: '' })
    expect(bad.status).toBe(400)
    const r = await student.post(`/api/placements/${placementId}/reprints`, { quantity: 1, reason: 'Torn off in the quarter-final' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const job = (await operator.get(`/api/jobs/${r.body.jobId}`)).body
    expect(job).toMatchObject({ kind: 'reprint', quantity: 1, state: 'queued', reason: 'Torn off in the quarter-final', revision: { id: approvedRevision.id } })
    await waitForMail(DEMO_ACCOUNTS.operator.email, /Reprint: 1 × Gear wren/)
    const other = await signedIn('tomasz@harbourline.example', DEMO_PASSWORD)
    expect((await other.post(`/api/placements/${placementId}/reprints`, { quantity: 1, reason: 'x' })).status).toBe(404)
  })

  it('keeps the history of the robot and of the artwork', async () => {
    const robot = (await student.get(`/api/robots/${robotId}/history`)).body
    expect(robot.map((h: any) => h.action)).toEqual(['add-robot', 'place', 'queue-job', 'mark-cut', 'mark-applied', 'reprint'])
    expect(robot.find((h: any) => h.action === 'reprint')).toMatchObject({ by: DEMO_ACCOUNTS.student.name, detail: { reason: 'Torn off in the quarter-final' } })
    const artwork = (await student.get(`/api/artworks/${approvedRevision.artworkId}/history`)).body
    expect(artwork.map((h: any) => h.action)).toEqual(['upload', 'submit', 'approve', 'place'])
    const other = await signedIn('tomasz@harbourline.example', DEMO_PASSWORD)
    expect((await other.get(`/api/robots/${robotId}/history`)).status).toBe(404)
    expect((await other.get(`/api/artworks/${approvedRevision.artworkId}/history`)).status).toBe(404)
  })

  it('hides a job from an operator of another program (404)', async () => {
    const db = testDb()
    const program = await db.insertInto('program').values({ name: `Far program ${Date.now()}`, school: 'Elsewhere' }).returning('id').executeTakeFirstOrThrow()
    const team = await db.insertInto('team').values({ program_id: program.id, name: 'Far', colour: '#222222' }).returning('id').executeTakeFirstOrThrow()
    const { makeUser } = await import('../support/people')
    const u = await makeUser('Far Operator')
    await db.updateTable('users').set({ program_id: program.id }).where('id', '=', u.id).execute()
    await db.insertInto('membership').values({ user_id: u.id, team_id: team.id, role: 'operator' }).execute()
    const far = await signedIn(u.email, u.password)
    expect((await far.get(`/api/jobs/${jobId}`)).status).toBe(404)
    expect((await text(far, `/api/jobs/${jobId}/cut-sheet.svg`)).status).toBe(404)
    expect((await far.get('/api/jobs')).body).toEqual({ items: [], nextCursor: null })
  })

  it('takes a burst of 50 reprints at once and still answers its health check at once', async () => {
    // Every query inside a transaction uses it: no request holds one pool connection while
    // waiting for a second, so a burst queues for the pool instead of deadlocking it.
    const burst = await Promise.all(Array.from({ length: 50 }, (_, i) => student.post(`/api/placements/${placementId}/reprints`, { quantity: 1, reason: `burst ${i}` })))
    expect(burst.map((r) => r.status)).toEqual(Array(50).fill(201))
    const asked = Date.now()
    expect((await new ApiClient().get('/api/health')).status).toBe(200)
    expect(Date.now() - asked).toBeLessThan(5000)
  })
})
