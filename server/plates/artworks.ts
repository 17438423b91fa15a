// Plates as artworks: the generator's layers become artworks whose revision 1 is the exact
// vector (origin 'generated': no source, prepared bitmap or raw outline), measured from the
// stored SVG by the same measurement code as any vector, and reviewed like any artwork.
// A plate with a background is one layered artwork (background and numerals as colour layers,
// in register with registration marks, as the multi-colour work stores a traced decal).
import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { createRequire } from 'node:module'
import type { z } from 'zod'
import type { plateRequestSchema } from '../../shared/plates/schemas'
import type { Measurements, StageTimings } from '../../shared/types/pipeline'
import type { CreatedPlate, PlateFacts, PlateLayerFigures, PlateLayerRole, PlatePreview } from '../../shared/types/plates'
import type { RevisionColour } from '../../shared/types/layers'
import type { PlateColour } from '../../shared/plates/profiles'
import { fieldError } from '../platform/http'
import { inTransaction, type Db } from '../platform/db'
import { contentHash } from '../platform/object-store'
import type { Actor, TeamSubject } from '../policy'
import { audit, by } from '../history/service'
import { abandonClaim, claimAndStore, settleClaim } from '../artworks/objects'
import { ENGINE_VERSIONS_BASE } from '../pipeline/versions'
import { DEFAULT_PLATE_FONT_ID, PLATE_FONTS, loadPlateFont } from './font'
import { PLATE_COLOUR_HEX, PlateRequestError, framePlate, generatePlate, type GeneratedPlate } from './generate'
import { marksCut } from '../pipeline/colour/marks'
import { measureLayer, type LayerMeasurements } from './measure'
import { chosenProfile, findRuleProfile, resolveProfile, type RuleProfileRow } from './queries'
import { plateFontChoices } from './service'

const require = createRequire(import.meta.url)
const OPENTYPE_VERSION = (require('opentype.js/package.json') as { version: string }).version

type PlateInput = z.output<typeof plateRequestSchema>
interface Team extends TeamSubject { number: string | null }

async function profileFor(db: Db, actor: Actor, input: PlateInput): Promise<RuleProfileRow> {
  const row = input.profileId ? await findRuleProfile(db, actor.programId, input.profileId) : await chosenProfile(db, actor.programId)
  if (!row) {
    throw input.profileId
      ? fieldError(400, 'Please check the form: choose one of the program\'s rule profiles.', 'profileId', 'No such profile.')
      : fieldError(409, 'The program has no rule profile yet: a mentor chooses one on the rules page.', 'profileId', 'Choose a profile.')
  }
  return row
}

/** The plate as asked; a request the rules or the font cannot meet is a 422 beside its field. */
async function generate(db: Db, actor: Actor, team: Team, input: PlateInput): Promise<{ plate: GeneratedPlate; row: RuleProfileRow }> {
  const row = await profileFor(db, actor, input)
  const profile = resolveProfile(row)
  if (!profile) throw fieldError(409, 'This profile\'s preset is no longer shipped: choose another.', 'profileId')
  const teamNumber = input.teamNumber || team.number
  if (!teamNumber) throw fieldError(422, 'The team has no number yet: give one here, or a mentor sets it on the team.', 'teamNumber', 'Give the team number.')
  const fontId = input.fontId ?? DEFAULT_PLATE_FONT_ID
  if (!PLATE_FONTS.some((f) => f.id === fontId)) throw fieldError(400, 'Please check the form: choose one of the shipped fonts.', 'fontId', 'No such font.')
  try {
    const plate = generatePlate({
      teamNumber, profile, font: loadPlateFont(fontId), numeralHeightMm: input.numeralHeightMm, marginMm: input.marginMm,
      numeralColour: input.numeralColour, background: input.backgroundColour ? { colour: input.backgroundColour } : undefined,
    })
    return { plate, row }
  } catch (err) {
    if (!(err instanceof PlateRequestError)) throw err
    const field = /height|tall/i.test(err.message) ? 'numeralHeightMm' : /margin/i.test(err.message) ? 'marginMm'
      : /background/i.test(err.message) ? 'backgroundColour' : /numeral/i.test(err.message) ? 'numeralColour' : 'teamNumber'
    throw fieldError(422, err.message, field)
  }
}

export async function previewPlate(db: Db, actor: Actor, team: Team, input: PlateInput): Promise<PlatePreview> {
  const { plate, row } = await generate(db, actor, team, input)
  return {
    teamNumber: plate.teamNumber, profileId: row.id, widthMm: plate.widthMm, heightMm: plate.heightMm,
    numeralHeightMm: plate.numeralHeightMm, marginMm: plate.marginMm, grown: plate.grown,
    font: plateFontChoices().find((f) => f.id === plate.font.id)!,
    layers: plate.layers.map((l) => ({ role: l.role, colour: l.colour, svg: l.svg })),
  }
}

/** The revision's measurements in the pipeline's shape; what a traced revision has and this one has not is stated, not invented. */
function asMeasurements(m: LayerMeasurements): Measurements {
  return {
    widthMm: m.widthMm, heightMm: m.heightMm, inkAreaMm2: m.inkAreaMm2, cutLengthMm: m.cutLengthMm,
    pieces: m.pieces, holes: m.holes, nodes: m.nodes, narrowestFeatureMm: m.narrowestFeatureMm,
    smallPieces: m.smallPieces, smallPieceLimitMm2: m.smallPieceLimitMm2,
    // No prepared bitmap: the vector is exact, so it matches itself; no threshold was used.
    fidelity: 1, threshold: 0, pxPerMm: m.strokePxPerMm, preparedWidthPx: 0, preparedHeightPx: 0,
  }
}

const figures = (m: LayerMeasurements): PlateLayerFigures =>
  ({ tallestPieceMm: m.tallestPieceMm, marginMm: m.marginMm, strokeMm: m.narrowestFeatureMm, strokePxPerMm: m.strokePxPerMm })

const plateTitle = (n: string, layers: { role: string; colour: string }[]) => {
  const numerals = layers.find((l) => l.role === 'numerals')!, under = layers.find((l) => l.role === 'background')
  return `Plate ${n}: ${numerals.colour} numerals${under ? ` on ${under.colour}` : ''}`
}

const ENGINE_VERSIONS = () => ({ ...ENGINE_VERSIONS_BASE, potrace: 'not used', sharp: sharp.versions.sharp ?? '', vips: sharp.versions.vips, opentype: OPENTYPE_VERSION })

/** The whole decal's measurements from its layers': sums, and the least of the narrowest strokes. */
function totalOf(layers: LayerMeasurements[], widthMm: number, heightMm: number, pxPerMm: number): Measurements {
  const sum = (f: (m: LayerMeasurements) => number) => layers.reduce((a, m) => a + f(m), 0)
  const strokes = layers.map((m) => m.narrowestFeatureMm).filter((v): v is number => v !== null)
  return {
    ...asMeasurements(layers[0]!),
    widthMm, heightMm, inkAreaMm2: sum((m) => m.inkAreaMm2), cutLengthMm: sum((m) => m.cutLengthMm),
    pieces: sum((m) => m.pieces), holes: sum((m) => m.holes), nodes: sum((m) => m.nodes), smallPieces: sum((m) => m.smallPieces),
    narrowestFeatureMm: strokes.length ? Math.min(...strokes) : null, pxPerMm,
  }
}

interface StoredLayer { role: PlateLayerRole; colour: PlateColour; hex: string; bytes: Uint8Array; key: string; measured: LayerMeasurements }

const vectorFile = (svg: string) => {
  const bytes = new TextEncoder().encode(svg)
  return { bytes, key: `vector/${contentHash(bytes)}.svg` }
}

/**
 * Makes the plate's artwork with revision 1 in one transaction: with a background, one layered
 * revision (background bottom, numerals top, registration marks round the plate), stored like
 * a traced layered revision: the stacked vector as the revision's, a clean vector per layer,
 * revision_layer rows without prepared bitmap or raw outline. Numerals alone stay one colour.
 * Every figure is measured from the stored vectors. The caller has found the team and checked
 * `artwork.upload` in it.
 */
export async function createPlateArtworks(db: Db, actor: Actor, team: Team, input: PlateInput): Promise<CreatedPlate> {
  const t0 = performance.now()
  const { plate, row } = await generate(db, actor, team, input)
  const layered = plate.layers.length > 1
  const framed = layered ? framePlate(plate) : null
  const generatedMs = performance.now() - t0
  const t1 = performance.now()
  const stored: StoredLayer[] = []
  for (const [i, l] of plate.layers.entries()) {
    const svg = framed ? framed.layers[i]!.svg : l.svg
    // Measured from the SVG as stored, not taken from the generator: on a layered plate, the
    // ink inside the plate (the marks lie outside it).
    const box = framed?.plateBox
    const measured = await measureLayer(svg, box ? { within: { minX: box.x0, minY: box.y0, maxX: box.x1, maxY: box.y1 } } : {})
    stored.push({ role: l.role, colour: l.colour, hex: PLATE_COLOUR_HEX[l.colour], ...vectorFile(svg), measured })
  }
  const whole = framed ? vectorFile(framed.stackedSvg) : { bytes: stored[0]!.bytes, key: stored[0]!.key }
  const measureMs = performance.now() - t1
  const files = [whole, ...(framed ? stored : [])]
  const claim = await claimAndStore(db, files.map((f) => ({ key: f.key, bytes: f.bytes, type: 'image/svg+xml' })))
  const group = randomUUID()
  const numerals = stored.find((l) => l.role === 'numerals')!
  const layers = stored.map((l, position) => ({ position, role: l.role, colour: l.colour }))
  const widthMm = framed ? framed.frame.widthMm : numerals.measured.widthMm
  const heightMm = framed ? framed.frame.heightMm : numerals.measured.heightMm
  try {
    return await inTransaction(db, async (trx) => {
      const title = plateTitle(plate.teamNumber, layers)
      const artwork = await trx.insertInto('artwork').values({ team_id: team.teamId, title, author_id: actor.id }).returning('id').executeTakeFirstOrThrow()
      const facts: PlateFacts = {
        group, role: 'numerals', colour: numerals.colour, teamNumber: plate.teamNumber,
        profile: { id: row.id, name: row.name, key: plate.profileKey }, font: plate.font,
        numeralHeightMm: plate.numeralHeightMm, marginMm: plate.marginMm, cornerRadiusMm: plate.cornerRadiusMm,
        measured: { ...figures(numerals.measured), plateWidthMm: numerals.measured.widthMm, plateHeightMm: numerals.measured.heightMm },
        ...(framed ? { layers } : {}),
      }
      const colour: RevisionColour | null = framed
        ? {
            sentence: `${stored.length} colours: ${stored.map((l) => `${l.colour} ${l.role}`).join(' under ')}`,
            inks: stored.map((l) => ({ name: `${l.colour} ${l.role}`, hex: l.hex, share: l.measured.inkAreaMm2 / (plate.widthMm * plate.heightMm) })),
            stack: framed.stack, marks: framed.frame.marks.length > 0,
          }
        : null
      const timings: StageTimings = { prepareMs: 0, traceMs: 0, cleanMs: generatedMs, measureMs, totalMs: generatedMs + measureMs }
      const measurements = framed ? totalOf(stored.map((l) => l.measured), widthMm, heightMm, numerals.measured.strokePxPerMm) : asMeasurements(numerals.measured)
      const rev = await trx.insertInto('revision').values({
        artwork_id: artwork.id, number: 1, origin: 'generated', source_id: null, prepared_key: null, outline_key: null, vector_key: whole.key,
        settings: JSON.stringify({}), width_mm: widthMm, height_mm: heightMm, drawing_width_mm: plate.widthMm,
        measurements: JSON.stringify(measurements), timings: JSON.stringify(timings), engine_versions: JSON.stringify(ENGINE_VERSIONS()),
        plate: JSON.stringify(facts), author_id: actor.id,
        ...(framed ? { layer_count: stored.length, colour: JSON.stringify(colour) } : {}),
      }).returning('id').executeTakeFirstOrThrow()
      if (framed) {
        // The marks are outside each layer's measured ink, yet cut on its sheet beside it.
        const marks = marksCut(framed.frame)
        await trx.insertInto('revision_layer').values(stored.map((l, position) => {
          const { threshold: _, ...m } = asMeasurements(l.measured)
          return { revision_id: rev.id, position, name: `${l.colour} ${l.role}`, hex: l.hex, prepared_key: null, outline_key: null, vector_key: l.key, measurements: JSON.stringify({ ...m, marks }) }
        })).execute()
      }
      await audit(trx, {
        ...by(actor), action: 'generate-plate', subject: 'artwork', subjectId: artwork.id,
        detail: { title, revision: 1, teamNumber: plate.teamNumber, profile: row.name, role: layers.map((l) => l.role).join(' and '), colour: layers.map((l) => l.colour).join(' and ') },
      })
      await settleClaim(trx, claim)
      return { group, artworks: [{ artworkId: artwork.id, revisionId: rev.id, title, layers: layers.map(({ role, colour }) => ({ role, colour })) }] }
    })
  } catch (err) {
    await abandonClaim(db, claim)
    throw err
  }
}
