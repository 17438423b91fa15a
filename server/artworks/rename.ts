// A new title for an artwork: nothing about its revisions, approval or placements changes.
import type { ArtworkDetail } from '#shared/types/artworks'
import { inTransaction, type Db } from '../platform/db'
import type { Actor } from '../policy'
import { audit, by } from '../history/service'
import { findArtwork, type ArtworkRow } from './queries'
import { artworkDetail } from './service'

/** The caller has found the artwork and checked `artwork.revise`. */
export async function renameArtwork(db: Db, actor: Actor, artwork: ArtworkRow, title: string): Promise<ArtworkDetail> {
  if (title === artwork.title) return artworkDetail(db, actor, artwork)
  const row = await inTransaction(db, async (trx) => {
    await trx.updateTable('artwork').set({ title }).where('id', '=', artwork.id).execute()
    await audit(trx, { ...by(actor), action: 'rename-artwork', subject: 'artwork', subjectId: artwork.id, detail: { from: artwork.title, to: title } })
    return findArtwork(trx, actor, artwork.id)
  })
  return artworkDetail(db, actor, row!)
}
