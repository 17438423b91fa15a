// Number plates end to end: a program's rule profiles, plates generated as artworks and
// measured from their stored vectors, robots checked against the rules, and the event kit.
// Team numbers and names are invented.
import { beforeAll, describe, expect, it } from 'vitest'
import { svgPathProperties } from 'svg-path-properties'
import type { RuleProfile } from '../../shared/plates/profiles'
import { formatMmText } from '../../shared/plates/check'
import { EVENT_KIT_REASON } from '../../server/plates/robot-check'
import { signedIn, type ApiClient } from '../support/client'
import { testDb } from '../support/db'
import { hashPassword } from '../../server/platform/passwords'
import { buildProgram, type ProgramFixture } from '../support/fixtures'
import { drawing } from '../support/images'
import { uploadArtwork } from '../support/upload'
import { getKeyText } from '../support/s3'

let student: ApiClient
let mentor: ApiClient
let wrens: number
let program: ProgramFixture
const stamp = Date.now().toString(36)

const filmBody = (name: string, colour: string, colourHex: string) => ({
  name, polymerCode: 'PET', colour, colourHex, opacity: 'opaque', thicknessMm: 0.08,
  sheetWidthMm: 300, sheetHeightMm: 300, minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1, sheetsOnHand: 20,
})
const films = {} as Record<'white' | 'red' | 'black', number>

beforeAll(async () => {
  // A program of its own: choosing rules here must not change what other test files see.
  const db = testDb()
  const password = 'fixture-password-123'
  program = await buildProgram(db, { passwordHash: await hashPassword(password) })
  wrens = program.teams[0].id
  await db.updateTable('team').set({ number: 'HL-9' }).where('id', '=', wrens).execute()
  student = await signedIn(program.emails.get(program.teams[0].student)!, password)
  mentor = await signedIn(program.emails.get(program.mentor)!, password)
  for (const [key, colour, hex] of [['white', 'Bright white', '#fafafa'], ['red', 'Signal red', '#c0282d'], ['black', 'Gloss black', '#111111']] as const) {
    const r = await mentor.post('/api/films', filmBody(`Plate ${colour} ${stamp}`, colour, hex))
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    films[key] = r.body.id
  }
})

describe('rule profiles', () => {
  let ftcRef: number
  let copy: { id: number; profile: RuleProfile }

  it('a mentor follows a shipped preset and chooses it for the program; asking again finds the same profile', async () => {
    const r = await mentor.post('/api/rule-profiles', { presetKey: 'ftc-2025-26' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body).toMatchObject({ presetKey: 'ftc-2025-26', editable: false, profile: { key: 'ftc-2025-26', season: '2025–26' } })
    ftcRef = r.body.id
    expect((await mentor.post('/api/rule-profiles', { presetKey: 'ftc-2025-26' })).body.id).toBe(ftcRef)
    const chosen = await mentor.put('/api/program/rule-profile', { ruleProfileId: ftcRef })
    expect(chosen.status, JSON.stringify(chosen.body)).toBe(200)
    expect(chosen.body.chosenId).toBe(ftcRef)
    // Everyone in the program reads the profile that applies; only a mentor may change it.
    const page = (await student.get('/api/rule-profiles')).body
    expect(page.chosenId).toBe(ftcRef)
    expect(page.can['program.manage']).toBe(false)
    expect(page.presets.map((p: RuleProfile) => p.key)).toEqual(['frc-2023', 'ftc-2025-26', 'v5rc-2024-25'])
  })

  it('a preset cannot be edited, only copied; the copy keeps the manual and rule beside each value and marks what the program changed', async () => {
    expect((await mentor.patch(`/api/rule-profiles/${ftcRef}`, { name: 'Ours' })).status).toBe(409)
    const r = await mentor.post('/api/rule-profiles', { copyOf: ftcRef, name: `FTC with a stroke rule ${stamp}` })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body).toMatchObject({ editable: true, presetKey: null, copiedFrom: 'FIRST Tech Challenge 2025–26' })
    const profile: RuleProfile = r.body.profile
    expect(profile.key).not.toBe('ftc-2025-26')
    // A stroke rule of our own: 5 mm.
    profile.numerals.minStroke = { value: { value: 5, unit: 'mm' }, source: { manual: profile.manual, rule: 'R403', provenance: 'from this issue' } }
    const e = await mentor.patch(`/api/rule-profiles/${r.body.id}`, { profile })
    expect(e.status, JSON.stringify(e.body)).toBe(200)
    expect(e.body.profile.numerals.minStroke.source.provenance).toBe('set by the program')
    // Unchanged values keep where they came from.
    expect(e.body.profile.numerals.minHeight.source).toEqual({ manual: 'FIRST Tech Challenge 2025–26 Competition Manual', rule: 'R403', provenance: 'from this issue' })
    copy = e.body
    // A profile that contradicts itself is refused beside its field.
    const bad = structuredClone(profile)
    bad.numerals.maxHeight = { value: { value: 1, unit: 'in' }, source: bad.numerals.minHeight!.source }
    const refused = await mentor.patch(`/api/rule-profiles/${copy.id}`, { profile: bad })
    expect(refused.status).toBe(400)
  })

  it('students cannot add, edit or choose profiles (403)', async () => {
    expect((await student.post('/api/rule-profiles', { presetKey: 'frc-2023' })).status).toBe(403)
    expect((await student.patch(`/api/rule-profiles/${copy.id}`, { name: 'Student rules' })).status).toBe(403)
    expect((await student.put('/api/program/rule-profile', { ruleProfileId: copy.id })).status).toBe(403)
    expect((await student.get(`/api/rule-profiles/${copy.id}`)).status).toBe(200)
  })

  it('another program\'s profile does not exist here (404), and cannot be chosen', async () => {
    const db = testDb()
    const far = await buildProgram(db)
    const theirs = await db.insertInto('rule_profile').values({ program_id: far.id, name: 'Far rules', preset_key: 'v5rc-2024-25', created_by: far.mentor })
      .returning('id').executeTakeFirstOrThrow()
    expect((await mentor.get(`/api/rule-profiles/${theirs.id}`)).status).toBe(404)
    expect((await mentor.patch(`/api/rule-profiles/${theirs.id}`, { name: 'Mine now' })).status).toBe(404)
    expect((await mentor.put('/api/program/rule-profile', { ruleProfileId: theirs.id })).status).toBe(400)
    expect((await mentor.get('/api/rule-profiles')).body.profiles.map((p: { id: number }) => p.id)).not.toContain(theirs.id)
    // The database holds it too: a program points only at its own profiles.
    await expect(db.updateTable('program').set({ rule_profile_id: theirs.id }).where('id', '=', program.id).execute()).rejects.toThrow(/program_rule_profile_own/)
  })

  it('the copy with the stroke rule becomes the program\'s profile for the plates below', async () => {
    expect((await mentor.put('/api/program/rule-profile', { ruleProfileId: copy.id })).body.chosenId).toBe(copy.id)
  })
})

interface Plate { artworkId: number; revisionId: number }

interface Box { minX: number; minY: number; maxX: number; maxY: number }

/** Bounding box of every piece (subpath) of the path, each sampled every 0.01 mm along it by svg-path-properties. */
function pieceBoxes(svg: string): Box[] {
  const d = /\bd="([^"]+)"/.exec(svg)![1]!
  return d.split(/(?=M)/).filter((x) => x.trim()).map((sub) => {
    const props = new svgPathProperties(sub)
    const total = props.getTotalLength()
    const box = { minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity }
    for (let s = 0; s <= total; s += 0.01) {
      const p = props.getPointAtLength(s)
      box.minX = Math.min(box.minX, p.x); box.maxX = Math.max(box.maxX, p.x)
      box.minY = Math.min(box.minY, p.y); box.maxY = Math.max(box.maxY, p.y)
    }
    return box
  })
}

describe('the plate generator', () => {
  let plate: Plate

  it('previews at the profile\'s rules without storing anything, and refuses numerals outside them', async () => {
    const before = await testDb().selectFrom('artwork').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
    const r = await student.post(`/api/teams/${wrens}/plates/preview`, { teamNumber: '4711', numeralHeightMm: 50, backgroundColour: 'red' })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body.layers.map((l: { role: string; colour: string }) => `${l.role} ${l.colour}`)).toEqual(['background red', 'numerals white'])
    // FTC R402: at least 6.5 × 2.5 in, 1 in = 25.4 mm exactly.
    expect(r.body.widthMm).toBeGreaterThanOrEqual(6.5 * 25.4)
    expect(r.body.heightMm).toBeGreaterThanOrEqual(2.5 * 25.4)
    const after = await testDb().selectFrom('artwork').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
    expect(after.n).toBe(before.n)
    // FTC R403: 2.25 ± 0.5 in, so 30 mm (1.18 in) is too small.
    const small = await student.post(`/api/teams/${wrens}/plates/preview`, { teamNumber: '4711', numeralHeightMm: 30 })
    expect(small.status).toBe(422)
    expect(small.body.data.fieldErrors.numeralHeightMm[0]).toMatch(/outside the rules/)
    const green = await student.post(`/api/teams/${wrens}/plates/preview`, { teamNumber: '4711', backgroundColour: 'green' })
    expect(green.status).toBe(422)
    expect(green.body.data.fieldErrors.backgroundColour[0]).toMatch(/red or blue/)
    // This team's number is not plate-shaped: the form must be given one.
    const own = await student.post(`/api/teams/${wrens}/plates/preview`, {})
    expect(own.status).toBe(422)
  })

  it('makes one layered artwork, background under numerals, an exact generated revision with only vectors', async () => {
    const r = await student.post(`/api/teams/${wrens}/plates`, { teamNumber: '4711', numeralHeightMm: 50, backgroundColour: 'red' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.artworks).toHaveLength(1)
    expect(r.body.artworks[0]).toMatchObject({ title: 'Plate 4711: white numerals on red', layers: [{ role: 'background', colour: 'red' }, { role: 'numerals', colour: 'white' }] })
    plate = r.body.artworks[0]
    const rev = (await student.get(`/api/revisions/${plate.revisionId}`)).body
    expect(rev).toMatchObject({ origin: 'generated', number: 1, status: 'draft', source: null, files: { prepared: null, outline: null, source: null } })
    expect(rev.plate).toMatchObject({ role: 'numerals', colour: 'white', teamNumber: '4711', numeralHeightMm: 50, font: { family: 'Work Sans', licence: 'OFL-1.1' } })
    expect((await student.get(`/api/revisions/${plate.revisionId}/prepared.png`)).status).toBe(404)
    // Stored like a traced layered revision: the stacked vector, a clean vector per layer, no bitmaps.
    const db = testDb()
    expect((await db.selectFrom('revision').select('layer_count').where('id', '=', plate.revisionId).executeTakeFirstOrThrow()).layer_count).toBe(2)
    const layers = await db.selectFrom('revision_layer').selectAll().where('revision_id', '=', plate.revisionId).orderBy('position').execute()
    expect(layers.map((l) => [l.name, l.prepared_key, l.outline_key])).toEqual([['red background', null, null], ['white numerals', null, null]])
    const stacked = await getKeyText((await db.selectFrom('revision').select('vector_key').where('id', '=', plate.revisionId).executeTakeFirstOrThrow()).vector_key)
    expect([...stacked.matchAll(/<g id="(dw-layer-\d)"/g)].map((m) => m[1])).toEqual(['dw-layer-1', 'dw-layer-2'])
    expect(stacked).toMatch(/width="[\d.]+mm" height="[\d.]+mm"/)
    // A generated plate has nothing to tune.
    expect((await mentor.post(`/api/artworks/${plate.artworkId}/revisions`, { settings: {}, widthMm: 100 })).status).toBe(409)
  })

  it('measures the stored numerals: height within 0.05 mm of the asked 50 mm, stroke at least the profile\'s 5 mm', async () => {
    const rev = (await student.get(`/api/revisions/${plate.revisionId}`)).body
    expect(Math.abs(rev.plate.measured.tallestPieceMm - 50)).toBeLessThanOrEqual(0.05)
    expect(rev.plate.measured.strokeMm).toBeGreaterThanOrEqual(5)
    expect(rev.measurements.narrowestFeatureMm).toBe(rev.plate.measured.strokeMm)
    // A second reading of the stored layers with svg-path-properties (npm), independent of our
    // geometry code: "4711" has flat tops and bottoms in this font (its figures 1, 4 and 7 span
    // the same 0–660 font units), so the numerals' ink height is the numerals' height. The
    // plate is the background's largest piece; the marks lie outside it.
    const keys = await testDb().selectFrom('revision_layer').select('vector_key').where('revision_id', '=', plate.revisionId).orderBy('position').execute()
    const [background, numerals] = await Promise.all(keys.map((k) => getKeyText(k.vector_key)))
    const area = (b: Box) => (b.maxX - b.minX) * (b.maxY - b.minY)
    const plateBox = pieceBoxes(background!).sort((x, y) => area(y) - area(x))[0]!
    const inside = pieceBoxes(numerals!).filter((b) => b.minX >= plateBox.minX && b.maxX <= plateBox.maxX && b.minY >= plateBox.minY && b.maxY <= plateBox.maxY)
    expect(Math.abs(plateBox.maxX - plateBox.minX - rev.plate.measured.plateWidthMm)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(Math.max(...inside.map((b) => b.maxY)) - Math.min(...inside.map((b) => b.minY)) - 50)).toBeLessThanOrEqual(0.05)
  })

  it('goes through review like any artwork and can then be placed', async () => {
    expect((await student.post(`/api/revisions/${plate.revisionId}/submit`)).status).toBe(200)
    const r = await mentor.post(`/api/revisions/${plate.revisionId}/review`, { decision: 'approve' })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
  })

  describe('robot checks and the event kit', () => {
    let robotId: number
    let widthMm: number
    let numeralHeight: number

    /** The plate placed with a film per layer: background, then numerals. */
    const place = async (layerFilmIds: number[], side: string, spot: string, width: number, spares = 1) => {
      const r = await mentor.post('/api/placements', { robotId, revisionId: plate.revisionId, layerFilmIds, spot, side, widthMm: width, quantity: 1, spares })
      expect(r.status, JSON.stringify(r.body)).toBe(201)
      return r.body
    }
    const check = async () => {
      const r = await student.get(`/api/robots/${robotId}/plate-check`)
      expect(r.status, JSON.stringify(r.body)).toBe(200)
      return r.body as { results: { rule: string; passed: boolean; sentence: string }[]; kitPlacements: number }
    }
    const result = (c: Awaited<ReturnType<typeof check>>, rule: string) => c.results.find((x) => x.rule === rule)!

    beforeAll(async () => {
      const r = await mentor.post('/api/robots', { teamId: wrens, name: `Plate bot ${stamp}`, season: '2025–26' })
      robotId = r.body.id
      const rev = (await mentor.get(`/api/revisions/${plate.revisionId}`)).body
      widthMm = rev.widthMm
      numeralHeight = rev.plate.measured.tallestPieceMm
    })

    it('one plate on the front: everything passes but the sides', async () => {
      const p = await place([films.red, films.white], 'front', 'front bumper', widthMm, 2)
      expect(p.side).toBe('front')
      const c = await check()
      // Worked by hand: the FTC profile asks for two plates at least 90° apart (R401); only the front has one.
      expect(result(c, 'sides')).toMatchObject({ passed: false, sentence: 'Plates only on the front: the rules ask for two plates at least 90° apart.' })
      expect(c.results.filter((x) => !x.passed).map((x) => x.rule)).toEqual(['sides'])
    })

    it('a second side passes the side rule; black numerals on it are the wrong colour', async () => {
      await place([films.red, films.black], 'back', 'back bumper', widthMm)
      const c = await check()
      expect(result(c, 'sides')).toMatchObject({ passed: true, sentence: 'Plates on the front and back: two plates at least 90° apart, as the rules ask.' })
      expect(result(c, 'numeral-colour')).toMatchObject({
        passed: false, sentence: 'The numerals on the back plate (back bumper) are black: the rules ask for white numerals.',
      })
    })

    let leftId: number
    it('a plate placed at half size has numerals too small', async () => {
      leftId = (await place([films.red, films.white], 'left', 'left panel', widthMm / 2)).id
      const c = await check()
      // Half the measured height; the FTC range is 1.75 to 2.75 in = 44.45 to 69.85 mm.
      expect(result(c, 'numeral-height')).toMatchObject({
        passed: false,
        sentence: `The numerals on the left plate (left panel) are ${formatMmText(numeralHeight / 2)} mm tall: the rules ask for numerals 44.45 to 69.85 mm tall (1.75 to 2.75 in).`,
      })
      expect(result(c, 'background').passed).toBe(true)
      expect(c.kitPlacements).toBe(3)
    })

    it('a placement\'s side can be changed, and the check follows it', async () => {
      const r = await mentor.patch(`/api/placements/${leftId}`, { side: 'top' })
      expect(r.status, JSON.stringify(r.body)).toBe(200)
      expect(r.body.placement.side).toBe('top')
      const c = await check()
      expect(result(c, 'numeral-height').sentence).toMatch(/^The numerals on the top plate \(left panel\) are /)
    })

    let marked: number
    let unmarked: number
    it('a decal marked as needed at events joins the kit; one not marked stays out, until it is marked', async () => {
      const up = await uploadArtwork(student, { file: await drawing('png', 600, 400), title: `Team mascot ${stamp}`, teamId: wrens, widthMm: 40 })
      expect(up.status, JSON.stringify(up.body)).toBe(201)
      expect((await student.post(`/api/revisions/${up.body.revision.id}/submit`)).status).toBe(200)
      expect((await mentor.post(`/api/revisions/${up.body.revision.id}/review`, { decision: 'approve' })).status).toBe(200)
      const put = async (spot: string, neededAtEvents?: boolean) => {
        const r = await mentor.post('/api/placements', { robotId, revisionId: up.body.revision.id, filmId: films.white, spot, widthMm: 40, quantity: 1, spares: 3, ...(neededAtEvents === undefined ? {} : { neededAtEvents }) })
        expect(r.status, JSON.stringify(r.body)).toBe(201)
        return r.body
      }
      const a = await put('driver panel', true)
      expect(a.neededAtEvents).toBe(true)
      marked = a.id
      const b = await put('arm')
      expect(b.neededAtEvents).toBe(false)
      unmarked = b.id
      // Three plates and the marked decal.
      expect((await check()).kitPlacements).toBe(4)
      const on = await mentor.patch(`/api/placements/${unmarked}`, { neededAtEvents: true })
      expect(on.status, JSON.stringify(on.body)).toBe(200)
      expect(on.body.placement.neededAtEvents).toBe(true)
      expect((await check()).kitPlacements).toBe(5)
      const off = await mentor.patch(`/api/placements/${unmarked}`, { neededAtEvents: false })
      expect(off.body.placement.neededAtEvents).toBe(false)
      expect((await check()).kitPlacements).toBe(4)
      // The robot's page shows the mark.
      const robot = (await student.get(`/api/robots/${robotId}`)).body as { placements: { id: number; neededAtEvents: boolean }[] }
      expect(robot.placements.filter((p) => p.neededAtEvents).map((p) => p.id)).toEqual([marked])
      // A student may not change a placement, the mark included.
      expect((await student.patch(`/api/placements/${marked}`, { neededAtEvents: false })).status).toBe(403)
    })

    it('the event kit queues one reprint job per placement (per layer of a plate), in one batch per film, in one request', async () => {
      const r = await student.post(`/api/robots/${robotId}/event-kit`)
      expect(r.status, JSON.stringify(r.body)).toBe(201)
      expect(r.body.jobIds).toHaveLength(7)
      const jobs = await testDb().selectFrom('job').innerJoin('placement', 'placement.id', 'job.placement_id').innerJoin('batch', 'batch.id', 'job.batch_id')
        .select(['job.id', 'job.kind', 'job.quantity', 'job.reason', 'job.state', 'job.layer', 'job.film_id', 'job.batch_id', 'batch.film_id as batch_film', 'batch.state as batch_state', 'placement.id as placement_id', 'placement.side'])
        .where('job.id', 'in', r.body.jobIds).orderBy('job.id').execute()
      // Worked by hand: each plate is one order of a job per layer (background 0, numerals 1), at
      // the plate's spares (2, then at least 1); the marked decal's 3; never the unmarked one.
      expect(jobs.map((j) => [j.kind, j.side, j.layer, j.quantity])).toEqual([
        ['reprint', 'front', 0, 2], ['reprint', 'front', 1, 2], ['reprint', 'back', 0, 1], ['reprint', 'back', 1, 1], ['reprint', 'top', 0, 1], ['reprint', 'top', 1, 1], ['reprint', null, null, 3],
      ])
      expect(jobs.map((j) => j.placement_id)).toContain(marked)
      expect(jobs.map((j) => j.placement_id)).not.toContain(unmarked)
      expect(new Set(jobs.map((j) => j.reason))).toEqual(new Set([EVENT_KIT_REASON]))
      // Every job in a queued batch of its own film; one batch per film: white, red and black.
      expect(jobs.every((j) => j.batch_film === j.film_id && j.batch_state === 'queued' && j.state === 'queued')).toBe(true)
      const byFilm = new Map<number, Set<number>>()
      for (const j of jobs) byFilm.set(j.film_id, (byFilm.get(j.film_id) ?? new Set()).add(j.batch_id!))
      expect([...byFilm.keys()].sort()).toEqual([films.white, films.red, films.black].sort())
      expect([...byFilm.values()].every((b) => b.size === 1)).toBe(true)
      // The answer says the same: each batch with its film, jobs and copies, worked by hand: white
      // holds the front numerals (2), the top numerals (1) and the marked decal (3); red the three
      // backgrounds (2 + 1 + 1); black the back numerals (1).
      const batches = r.body.batches as { id: number; filmId: number; filmName: string; jobIds: number[]; copies: number }[]
      expect(batches).toHaveLength(3)
      expect(Object.fromEntries(batches.map((b) => [b.filmId, b.copies]))).toEqual({ [films.white]: 6, [films.red]: 4, [films.black]: 1 })
      expect(r.body.copies).toBe(11)
      for (const b of batches) expect(b.jobIds.every((id) => jobs.find((j) => j.id === id)!.batch_id === b.id)).toBe(true)
      // The cut queue lists each batch.
      const queue = await mentor.get('/api/batches')
      expect(queue.status, JSON.stringify(queue.body)).toBe(200)
      const listed = (queue.body.batches as { id: number }[]).map((b) => b.id)
      for (const b of batches) expect(listed).toContain(b.id)
    })

    it('the kit is queued whole or not at all: one plate in a retired film refuses it, and no job is added', async () => {
      const count = async () => (await testDb().selectFrom('job').innerJoin('placement', 'placement.id', 'job.placement_id')
        .select((eb) => eb.fn.countAll<number>().as('n')).where('placement.robot_id', '=', robotId).executeTakeFirstOrThrow()).n
      const before = await count()
      expect((await mentor.patch(`/api/films/${films.black}`, { retired: true, retiredReason: 'Roll used up' })).status).toBe(200)
      const r = await student.post(`/api/robots/${robotId}/event-kit`)
      expect(r.status).toBe(422)
      expect(r.body.message).toMatch(/may not be cut now/)
      expect(await count()).toBe(before)
    })
  })
})
