// The film library through the API: the polymer register (every chlorine- and fluorine-bearing
// name refused, the polyurethane case), test grids and test cuts, stock against the cut queue,
// and the corrections a job and a placement need.
import { beforeAll, describe, expect, it } from 'vitest'
import DxfParser from 'dxf-parser'
import { matchPolymer, normaliseMaterialText, POLYMERS } from '../../shared/films/polymers'
import { allPages, signedIn, type ApiClient } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { waitForMail } from '../support/mail'
import { approvedOnRobot } from '../support/scenario'
import { spellings } from '../support/spellings'

let mentor: ApiClient
let operator: ApiClient
let student: ApiClient
const stamp = Date.now().toString(36)

const filmBody = (name: string, polymerCode: string, extra: object = {}) => ({
  name, polymerCode, colour: 'orange', colourHex: '#e07020', opacity: 'opaque', thicknessMm: 0.08,
  sheetWidthMm: 300, sheetHeightMm: 200, minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1, ...extra,
})

async function filmCount() {
  return (await testDb().selectFrom('film').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()).n
}

beforeAll(async () => {
  mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
  operator = await signedIn(DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD)
  student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
})

describe('the polymer register through the API', () => {
  it('lists the register with verdicts and sources, and searches it by any common name', async () => {
    expect((await new (await import('../support/client')).ApiClient().get('/api/polymers')).status).toBe(401)
    const all = (await student.get('/api/polymers')).body
    expect(all.map((p: { code: string }) => p.code).sort()).toEqual(POLYMERS.map((p) => p.code).sort())
    const pu = (await student.get('/api/polymers?q=PVC-free')).body[0]
    expect(pu).toMatchObject({ code: 'PU', verdict: 'ask-the-lab', chlorineFree: true, halogens: [] })
    expect(pu.why).toMatch(/hydrogen cyanide/)
  })

  it('refuses every chlorine- and fluorine-bearing name and synonym, in several spellings: as typed, and as the register reads it', async () => {
    const before = await filmCount()
    let asked = 0
    for (const p of POLYMERS.filter((x) => x.halogens.length)) {
      const refusal = await mentor.post('/api/films', filmBody(`Refused ${p.code} ${stamp}`, p.code))
      expect(refusal.status, p.code).toBe(400)
      expect(refusal.body.data.fieldErrors.polymerCode[0], p.code).toMatch(new RegExp(`${p.name.replace(/[()]/g, '.')} can never be placed or cut`))
      expect(refusal.body.data.fieldErrors.polymerCode[0], p.code).toMatch(p.halogens.includes('chlorine') ? /hydrogen chloride/ : /hydrogen fluoride/)
      for (const name of p.names) {
        for (const typed of spellings(name)) {
          // A typed name is never a polymer: only a choice from the register is.
          const typedFilm = await mentor.post('/api/films', filmBody(`Typed ${asked} ${stamp}`, typed))
          expect(typedFilm.status, typed).toBe(400)
          expect(Object.keys(typedFilm.body.data.fieldErrors), typed).toEqual(['polymerCode'])
          // The register reads the spelling as the halogen-bearing polymer…
          expect(matchPolymer(typed)?.code, typed).toBe(p.code)
          asked++
        }
        // …and the films form's search finds it under that name, with the verdict that refuses it.
        const bare = (t: string) => normaliseMaterialText(t).replace(/ /g, '')
        for (const typed of spellings(name).filter((t) => bare(t) === bare(name))) {
          const found = (await mentor.get(`/api/polymers?q=${encodeURIComponent(typed)}`)).body as { code: string; verdict: string }[]
          expect(found.find((f) => f.code === p.code), `search "${typed}"`).toMatchObject({ verdict: 'never' })
        }
      }
    }
    expect(asked).toBeGreaterThan(300)
    expect(await filmCount()).toBe(before)
  })

  it('"PVC-free vinyl" is polyurethane: placed and cut only once a mentor records the lab\'s approval with its safety data sheet', async () => {
    const s = await approvedOnRobot(`PU ${stamp}`)
    expect(matchPolymer('PVC-free vinyl')?.code).toBe('PU')
    const created = await mentor.post('/api/films', filmBody(`Satin PVC-free vinyl ${stamp}`, 'PU', { sheetsOnHand: 5 }))
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject({ cleared: false, usable: false, labApproval: null, polymer: { code: 'PU', verdict: 'ask-the-lab' } })
    const filmId = created.body.id
    const place = () => mentor.post('/api/placements', { robotId: s.robotId, revisionId: s.revisionId, filmId, spot: 'left side panel', widthMm: 40, quantity: 1, spares: 0 })
    const refused = await place()
    expect(refused.status).toBe(422)
    expect(refused.body.message).toMatch(/needs the lab's approval/)
    expect((await operator.post(`/api/films/${filmId}/lab-approval`, { safetyDataSheet: 'x sheet' })).status).toBe(403)
    expect((await mentor.post(`/api/films/${filmId}/lab-approval`, { safetyDataSheet: '' })).status).toBe(400)
    const approved = await mentor.post(`/api/films/${filmId}/lab-approval`, { safetyDataSheet: 'Maker X satin PU, SDS rev. 3' })
    expect(approved.body).toMatchObject({ cleared: true, usable: true, labApproval: { by: DEMO_ACCOUNTS.mentor.name, safetyDataSheet: 'Maker X satin PU, SDS rev. 3' } })
    expect((await place()).status).toBe(201)
    expect((await mentor.request('DELETE', `/api/films/${filmId}/lab-approval`)).status).toBe(409)
    // The PVC film of the demo can never be approved.
    const pvc = (await testDb().selectFrom('film').select('id').where('name', '=', 'Glossy white sign vinyl').executeTakeFirstOrThrow()).id
    expect((await mentor.post(`/api/films/${pvc}/lab-approval`, { safetyDataSheet: 'any' })).status).toBe(422)
  })
})

describe('test grids and test cuts', () => {
  it('an operator downloads a film\'s test grid and records the square that weeded cleanly: the film\'s laser settings', async () => {
    const film = (await mentor.post('/api/films', filmBody(`Clear test film ${stamp}`, 'PET', { colour: 'clear', colourHex: '#ffffff', opacity: 'clear' }))).body
    expect(film.beamCaution).toMatch(/clear film may let a blue diode laser's beam/)
    const q = 'powerFrom=40&powerTo=70&powerSteps=4&speedFrom=10&speedTo=30&speedSteps=5&passes=2&squareMm=10'
    expect((await student.get(`/api/films/${film.id}/test-grid?${q}`)).status).toBe(403)
    const plan = (await operator.get(`/api/films/${film.id}/test-grid?${q}`)).body
    // Hand-computed: 40 → 70 % in 4 rows, 10 → 30 mm/s in 5 columns.
    expect(plan.rows.map((r: { powerPercent: number }) => r.powerPercent)).toEqual([40, 50, 60, 70])
    expect(plan.columns.map((c: { speedMmS: number }) => c.speedMmS)).toEqual([10, 15, 20, 25, 30])
    const dxf = await fetch(new URL(`/api/films/${film.id}/test-grid.dxf?${q}`, operator.baseUrl), { headers: { cookie: [...operator.cookies].map(([k, v]) => `${k}=${v}`).join('; ') } })
    expect(dxf.status).toBe(200)
    expect(dxf.headers.get('content-disposition')).toMatch(/attachment; filename="test-grid-clear-test-film-.*\.dxf"/)
    // Read back by dxf-parser: 20 closed 10 mm squares.
    const parsed = new DxfParser().parseSync(await dxf.text()) as { entities: { type: string; shape?: boolean }[] }
    const squares = parsed.entities.filter((e) => e.type === 'POLYLINE')
    expect(squares).toHaveLength(20)
    expect(squares.every((e) => e.shape)).toBe(true)
    // Too many squares for the sheet: said in words.
    const big = await operator.get(`/api/films/${film.id}/test-grid?powerFrom=10&powerTo=100&powerSteps=26&speedFrom=1&speedTo=20&speedSteps=20&squareMm=10`)
    expect(big.status).toBe(422)
    expect(big.body.message).toMatch(/does not fit on the 300 × 200 mm sheet/)

    const grid = { power: { from: 40, to: 70, steps: 4 }, speed: { from: 10, to: 30, steps: 5 }, passes: 2, squareMm: 10 }
    expect((await student.post(`/api/films/${film.id}/tests`, { grid, square: 'C4' })).status).toBe(403)
    const recorded = await operator.post(`/api/films/${film.id}/tests`, { grid, square: 'c4', kerfMm: 0.17, note: 'clean at C4' })
    expect(recorded.status, JSON.stringify(recorded.body)).toBe(201)
    expect(recorded.body).toMatchObject({ laserPowerPct: 60, laserSpeedMmS: 25, laserPasses: 2, kerfMm: 0.17, kerfMeasured: true, beamCaution: null, lastTest: { square: 'C4', by: DEMO_ACCOUNTS.operator.name } })
    const lines = (await allPages(mentor, '/api/audit')).filter((l: { action: string; subjectId: string }) => l.action === 'test-film' && l.subjectId === String(film.id))
    expect(lines).toHaveLength(1)
  })
})

describe('stock and corrections', () => {
  it('the queue shows sheets needed against sheets on hand and warns before a job runs out; a delivery covers it; a cut takes the sheets', async () => {
    const s = await approvedOnRobot(`Stock ${stamp}`)
    const film = (await mentor.post('/api/films', filmBody(`Empty shelf film ${stamp}`, 'PET', { sheetsOnHand: 0 }))).body
    const placed = await mentor.post('/api/placements', { robotId: s.robotId, revisionId: s.revisionId, filmId: film.id, spot: 'front', widthMm: 50, quantity: 2, spares: 1 })
    const jobId = placed.body.jobs[0].id
    const queued = async () => (await allPages(operator, `/api/jobs?filmId=${film.id}&state=queued`)).find((j: { id: number }) => j.id === jobId)
    expect((await queued()).stock).toEqual({ sheetsNeeded: 1, neededAhead: 0, onHand: 0, enough: false })
    expect((await operator.post(`/api/films/${film.id}/stock`, { kind: 'delivery', sheets: 5 })).status).toBe(403)
    const delivered = await mentor.post(`/api/films/${film.id}/stock`, { kind: 'delivery', sheets: 5, note: 'Order 7' })
    expect(delivered.body.sheetsOnHand).toBe(5)
    expect((await queued()).stock).toMatchObject({ onHand: 5, enough: true })
    const cut = await operator.post(`/api/jobs/${jobId}/state`, { state: 'cut' })
    expect(cut.body).toMatchObject({ state: 'cut', sheetsUsed: 1 })
    const after = (await mentor.get(`/api/films/${film.id}`)).body
    expect(after.sheetsOnHand).toBe(4)
    expect(after.stock.map((e: { kind: string; change: number }) => [e.kind, e.change])).toEqual([['cut', -1], ['delivery', 5]])
  })

  it('cancel, fail and recut, edit and remove a placement, a spare before a reprint, rename a robot and an artwork', async () => {
    const s = await approvedOnRobot(`Fix ${stamp}`)
    const designer = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    const pet = s.film.id
    const placed = (await designer.post('/api/placements', { robotId: s.robotId, revisionId: s.revisionId, filmId: pet, spot: 'left', widthMm: 40, quantity: 1, spares: 1 })).body
    const first = placed.jobs[0].id

    // Cancel needs a reason, and a queue worker.
    expect((await student.post(`/api/jobs/${first}/cancel`, { reason: 'x' })).status).toBe(403)
    expect((await operator.post(`/api/jobs/${first}/cancel`, { reason: '' })).status).toBe(400)
    // A failed cut queues a recut and mails the operators.
    const failed = await operator.post(`/api/jobs/${first}/failure`, { failure: 'lifted', note: 'film curled' })
    expect(failed.body).toMatchObject({ state: 'failed', failure: 'lifted' })
    const recut = failed.body.recutBy
    await waitForMail(DEMO_ACCOUNTS.operator.email, /Recut: 2 × Fix/)
    const cancelled = await mentor.post(`/api/jobs/${recut}/cancel`, { reason: 'done by hand' })
    expect(cancelled.body).toMatchObject({ state: 'cancelled', cancelReason: 'done by hand', cancelledBy: DEMO_ACCOUNTS.mentor.name })
    expect((await operator.post(`/api/jobs/${recut}/state`, { state: 'cut' })).status).toBe(409)

    // An edit that asks for more queues the difference; a student may not edit.
    expect((await student.patch(`/api/placements/${placed.id}`, { quantity: 3 })).status).toBe(403)
    const edited = await designer.patch(`/api/placements/${placed.id}`, { quantity: 3, spot: 'left side panel' })
    expect(edited.status, JSON.stringify(edited.body)).toBe(200)
    expect(edited.body).toMatchObject({ placement: { quantity: 3, spot: 'left side panel' }, cancelledJobIds: [] })
    const extra = (await operator.get(`/api/jobs/${edited.body.queuedJobId}`)).body
    expect(extra).toMatchObject({ kind: 'extra', quantity: 2, state: 'queued' })

    // Cut and applied: 2 on the robot, 2 spares on the shelf (the failed job's good copies: none).
    await operator.post(`/api/jobs/${extra.id}/state`, { state: 'cut' })
    const applied = await operator.post(`/api/jobs/${extra.id}/state`, { state: 'applied', applied: 1 })
    expect(applied.body).toMatchObject({ appliedCount: 1, placement: { sparesOnHand: 1 } })
    const spare = await student.post(`/api/placements/${placed.id}/spares`, { count: 1, reason: 'torn in a match' })
    expect(spare.body.sparesOnHand).toBe(0)
    expect((await student.post(`/api/placements/${placed.id}/spares`, { count: 1, reason: 'again' })).status).toBe(409)

    const robot = await designer.patch(`/api/robots/${s.robotId}`, { name: `Renamed ${stamp}` })
    expect(robot.body.name).toBe(`Renamed ${stamp}`)
    const art = await designer.patch(`/api/artworks/${s.artworkId}`, { title: `Retitled ${stamp}` })
    expect(art.body.artwork.title).toBe(`Retitled ${stamp}`)
    expect((await student.patch(`/api/artworks/${s.artworkId}`, { title: 'nope' })).status).toBe(403)

    const removed = await designer.request('DELETE', `/api/placements/${placed.id}`, { reason: 'panel replaced' })
    expect(removed.status).toBe(200)
    expect((await student.get(`/api/robots/${s.robotId}`)).body.placements).toEqual([])
    const history = (await student.get(`/api/robots/${s.robotId}/history`)).body.map((h: { action: string }) => h.action)
    expect(history).toEqual(expect.arrayContaining(['fail-job', 'recut', 'cancel-job', 'edit-placement', 'queue-extra', 'mark-cut', 'mark-applied', 'apply-spare', 'edit-robot', 'remove-placement']))
  })
})
