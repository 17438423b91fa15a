import { describe, expect } from 'vitest'
import { can } from '../../server/policy'
import { findArtwork, findRevision, keysInUse } from '../../server/artworks/queries'
import { artworkDetail, listArtworks } from '../../server/artworks/service'
import { actorOf, test } from '../support/service'
import { addArtwork, buildProgram } from '../support/fixtures'

describe('the artwork list and its scopes', () => {
  test('shows each person exactly the artworks the policy lets them see', async ({ trx }) => {
    const here = await buildProgram(trx)
    const far = await buildProgram(trx)
    const [a, b] = here.teams
    const made = [
      await addArtwork(trx, { teamId: a.id, authorId: a.student }),
      await addArtwork(trx, { teamId: a.id, authorId: a.designer }),
      await addArtwork(trx, { teamId: b.id, authorId: b.student }),
      await addArtwork(trx, { teamId: far.teams[0].id, authorId: far.teams[0].student }),
    ]
    const teamOf = new Map([[made[0]!.id, a.id], [made[1]!.id, a.id], [made[2]!.id, b.id], [made[3]!.id, far.teams[0].id]])
    const programOf = (id: number) => (id === made[3]!.id ? far.id : here.id)
    for (const userId of [here.mentor, a.student, a.designer, a.operator, b.student, far.mentor]) {
      const actor = await actorOf(trx, userId)
      const listed = (await listArtworks(trx, actor, { limit: 100 })).items.map((i) => i.id).filter((id) => teamOf.has(id)).sort()
      // The SQL scope and the policy agree, row by row.
      const allowed = made.map((m) => m.id).filter((id) => can(actor, 'artwork.view', { teamId: teamOf.get(id)!, programId: programOf(id) })).sort()
      expect(listed, `user ${userId}`).toEqual(allowed)
      for (const m of made) {
        expect(!!(await findArtwork(trx, actor, m.id)), `artwork ${m.id} for ${userId}`).toBe(allowed.includes(m.id))
        expect(!!(await findRevision(trx, actor, m.revisionId))).toBe(allowed.includes(m.id))
      }
    }
    // Spot checks against the rules as written: a member sees their team, a mentor the program.
    expect((await listArtworks(trx, await actorOf(trx, a.operator), { limit: 100 })).items.map((i) => i.id).sort()).toEqual([made[0]!.id, made[1]!.id].sort())
    expect((await listArtworks(trx, await actorOf(trx, here.mentor), { limit: 100 })).total).toBe(3)
  })

  test('pages with a cursor, newest change first, each artwork once', async ({ trx }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const ids: number[] = []
    for (let i = 0; i < 5; i++) {
      const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, title: `Paged ${i}` })
      await trx.updateTable('artwork').set({ updated_at: new Date(Date.UTC(2026, 0, 1, 0, 0, i)) }).where('id', '=', art.id).execute()
      ids.push(art.id)
    }
    const actor = await actorOf(trx, team.student)
    const seen: number[] = []
    let cursor: string | undefined
    for (let pages = 0; pages < 5; pages++) {
      const page = await listArtworks(trx, actor, { limit: 2, cursor })
      expect(page.total).toBe(5)
      seen.push(...page.items.map((i) => i.id))
      if (!page.nextCursor) break
      cursor = page.nextCursor
    }
    expect(seen).toEqual([...ids].reverse())
    const search = await listArtworks(trx, actor, { limit: 10, q: 'paged 3' })
    expect(search.items.map((i) => i.id)).toEqual([ids[3]])
    // Underscores and percent signs are searched for as themselves.
    expect((await listArtworks(trx, actor, { limit: 10, q: '%' })).total).toBe(0)
  })

  test('says what the viewer may do with an artwork', async ({ trx }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student })
    const detail = async (userId: number) => {
      const actor = await actorOf(trx, userId)
      return (await artworkDetail(trx, actor, (await findArtwork(trx, actor, art.id))!)).can
    }
    expect(await detail(team.student)).toEqual({ 'artwork.revise': false, 'revision.submit': true, 'revision.review': false })
    expect(await detail(team.designer)).toEqual({ 'artwork.revise': true, 'revision.submit': true, 'revision.review': false })
    expect(await detail(team.operator)).toEqual({ 'artwork.revise': false, 'revision.submit': false, 'revision.review': false })
    expect(await detail(p.mentor)).toEqual({ 'artwork.revise': true, 'revision.submit': true, 'revision.review': true })
  })
})

describe('stored files in use', () => {
  test('a layered revision\'s layer files count as in use, so the sweep of unused files leaves them', async ({ trx }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    await addArtwork(trx, { teamId: team.id, authorId: team.student, layers: [{ name: 'red', hex: '#c8102e' }, { name: 'blue', hex: '#1f4e9c' }] })
    const layerKeys = ['prepared/fixture-0.png', 'outline/fixture-0.svg', 'vector/fixture-0.svg', 'prepared/fixture-1.png', 'outline/fixture-1.svg', 'vector/fixture-1.svg']
    const inUse = await keysInUse(trx, [...layerKeys, 'vector/nothing-points-here.svg'])
    expect([...inUse].sort()).toEqual([...layerKeys].sort())
  })
})
