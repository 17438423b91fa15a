// Plates as artworks: the generator's layers become artworks whose revision 1 is the exact
// vector (origin 'generated': no source, prepared bitmap or raw outline), measured from the
// stored SVG by the same measurement code as any vector, and reviewed like any artwork.
// Multi-colour artworks are not built yet, so a plate is one single-colour artwork per layer
// (background and numerals), tied together by a group id in each revision's plate facts.
import { randomUUID } from 'node:crypto'
import sharp from 'sharp'
import { createRequire } from 'node:module'
import type { z } from 'zod'
import type { plateRequestSchema } from '../../shared/plates/schemas'
import type { Measurements, StageTimings } from '../../shared/types/pipeline'
import type { CreatedPlate, PlateFacts, PlateLayerFigures, PlatePreview } from '../../shared/types/plates'
import { fieldError } from '../platform/http'
import { inTransaction, type Db } from '../platform/db'
import { contentHash } from '../platform/object-store'
import type { Actor, TeamSubject } from '../policy'
import { audit, by } from '../history/service'
import { abandonClaim, claimAndStore, settleClaim } from '../artworks/objects'
import { ENGINE_VERSIONS_BASE } from '../pipeline/versions'
import { DEFAULT_PLATE_FONT_ID, PLATE_FONTS, loadPlateFont } from './font'
import { PlateRequestError, generatePlate, type GeneratedPlate } from './generate'
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

const layerTitle = (n: string, role: string, colour: string) => `Plate ${n}: ${role === 'numerals' ? 'numerals' : 'background'} (${colour})`

/**
 * Makes the plate's artworks, each with revision 1, in one transaction. The caller has found
 * the team and checked `artwork.upload` in it.
 */
export async function createPlateArtworks(db: Db, actor: Actor, team: Team, input: PlateInput): Promise<CreatedPlate> {
  const t0 = performance.now()
  const { plate, row } = await generate(db, actor, team, input)
  const generatedMs = performance.now() - t0
  const enc = new TextEncoder()
  const layers: { layer: GeneratedPlate['layers'][number]; bytes: Uint8Array; key: string; measured: LayerMeasurements; measureMs: number }[] = []
  for (const l of plate.layers) {
    const bytes = enc.encode(l.svg)
    const t1 = performance.now()
    // Measured from the SVG as stored, not taken from the generator.
    const measured = await measureLayer(l.svg)
    layers.push({ layer: l, bytes, key: `vector/${contentHash(bytes)}.svg`, measured, measureMs: performance.now() - t1 })
  }
  const claim = await claimAndStore(db, layers.map((l) => ({ key: l.key, bytes: l.bytes, type: 'image/svg+xml' })))
  const group = randomUUID()
  try {
    return await inTransaction(db, async (trx) => {
      const out: CreatedPlate = { group, artworks: [] }
      for (const { layer, key, measured, measureMs } of layers) {
        const title = layerTitle(plate.teamNumber, layer.role, layer.colour)
        const artwork = await trx.insertInto('artwork').values({ team_id: team.teamId, title, author_id: actor.id }).returning('id').executeTakeFirstOrThrow()
        const facts: PlateFacts = {
          group, role: layer.role, colour: layer.colour, teamNumber: plate.teamNumber,
          profile: { id: row.id, name: row.name, key: plate.profileKey }, font: plate.font,
          numeralHeightMm: plate.numeralHeightMm, marginMm: plate.marginMm, cornerRadiusMm: plate.cornerRadiusMm,
          measured: figures(measured),
        }
        const timings: StageTimings = { prepareMs: 0, traceMs: 0, cleanMs: generatedMs, measureMs, totalMs: generatedMs + measureMs }
        const rev = await trx.insertInto('revision').values({
          artwork_id: artwork.id, number: 1, origin: 'generated', source_id: null, prepared_key: null, outline_key: null, vector_key: key,
          settings: JSON.stringify({}), width_mm: measured.widthMm, height_mm: measured.heightMm, drawing_width_mm: measured.widthMm,
          measurements: JSON.stringify(asMeasurements(measured)), timings: JSON.stringify(timings),
          engine_versions: JSON.stringify({ ...ENGINE_VERSIONS_BASE, potrace: 'not used', sharp: sharp.versions.sharp ?? '', vips: sharp.versions.vips, opentype: OPENTYPE_VERSION }),
          plate: JSON.stringify(facts), author_id: actor.id,
        }).returning('id').executeTakeFirstOrThrow()
        await audit(trx, {
          ...by(actor), action: 'generate-plate', subject: 'artwork', subjectId: artwork.id,
          detail: { title, revision: 1, teamNumber: plate.teamNumber, profile: row.name, role: layer.role, colour: layer.colour },
        })
        out.artworks.push({ artworkId: artwork.id, revisionId: rev.id, role: layer.role, colour: layer.colour, title })
      }
      await settleClaim(trx, claim)
      return out
    })
  } catch (err) {
    await abandonClaim(db, claim)
    throw err
  }
}
