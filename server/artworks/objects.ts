// Stored files are content-addressed: two uploads of the same bytes share one file. Files are
// written before the rows that point at them, so a failed or killed request can leave a file
// nothing points at, and a file one request gives up on may be the file another request has
// just decided to reuse. The protocol that keeps both safe, across any number of app processes:
//
// 1. Each key has a PostgreSQL advisory lock, pg_advisory_xact_lock(hashtextextended(key, 0)),
//    only ever held inside short transactions.
// 2. A request that is going to use keys first claims them: one transaction takes their locks
//    (in key order, so two claimers cannot deadlock) and inserts a claim row per key. Only after
//    that commits does it look for the files and write the missing ones.
// 3. The transaction that inserts the rows pointing at the files deletes the request's claim
//    rows, so at every moment a file in use is named by a committed claim or a committed row.
// 4. Whoever removes a file (a request that failed, or the sweeper) takes the key's lock in a
//    transaction, checks that no row points at the key and no claim names it, deletes the file
//    and only then commits.
//
// A removal and a claim of the same key are thus serialised by the lock: either the claim
// commits first and the remover sees it and keeps the file, or the removal finishes first and
// the claimer finds the file missing and writes it again. The sweeper removes only files older
// than the minimum age (so a process still running older code, which writes without claiming,
// has time to commit), and drops claims older than that age (their request died: no request
// runs that long); a request whose claim was dropped finds that out when it settles and fails.
import { randomUUID } from 'node:crypto'
import { sql, type Transaction } from 'kysely'
import type { Database } from '../db/schema'
import { inTransaction, type Db } from '../platform/db'
import { deleteObject, listObjects, objectExists, putObject } from '../platform/object-store'
import { keysInUse } from './queries'

/** The prefixes of the files this module stores; the sweeper looks nowhere else. */
export const STORED_PREFIXES = ['sources/', 'prepared/', 'outline/', 'vector/'] as const

export interface ObjectToStore { key: string; bytes: Uint8Array; type: string }
export interface ObjectClaim { token: string; keys: string[]; written: string[] }

function lockKey(trx: Transaction<Database>, key: string) {
  return sql`select pg_advisory_xact_lock(hashtextextended(${key}, 0))`.execute(trx)
}

/** Claims the keys (step 2), then writes the files that are missing. */
export async function claimAndStore(db: Db, objects: readonly ObjectToStore[]): Promise<ObjectClaim> {
  const keys = [...new Set(objects.map((o) => o.key))].sort()
  const claim: ObjectClaim = { token: randomUUID(), keys, written: [] }
  await inTransaction(db, async (trx) => {
    for (const key of keys) await lockKey(trx, key)
    await trx.insertInto('object_claim').values(keys.map((key) => ({ token: claim.token, key }))).execute()
  })
  try {
    for (const o of objects) {
      if (claim.written.includes(o.key) || await objectExists(o.key)) continue
      await putObject(o.key, o.bytes, o.type)
      claim.written.push(o.key)
    }
  } catch (err) {
    await abandonClaim(db, claim)
    throw err
  }
  return claim
}

/** In the transaction that inserts the rows pointing at the files (step 3). */
export async function settleClaim(trx: Transaction<Database>, claim: ObjectClaim): Promise<void> {
  const r = await trx.deleteFrom('object_claim').where('token', '=', claim.token).executeTakeFirst()
  if (Number(r.numDeletedRows) !== claim.keys.length) {
    // The sweeper took this request for dead; its files may be gone.
    throw new Error('The upload took too long and its stored files were cleaned away. Try again.')
  }
}

/** After a failure: gives up the claim and removes the files this request wrote that nothing uses. */
export async function abandonClaim(db: Db, claim: ObjectClaim): Promise<void> {
  try {
    await db.deleteFrom('object_claim').where('token', '=', claim.token).execute()
    for (const key of claim.written) await removeIfUnused(db, key)
  } catch (err) {
    // The sweeper finishes the job once the claim is old enough.
    console.error('[decalwright] could not clean up after a failed request:', err instanceof Error ? err.message : err)
  }
}

/** Step 4: removes the file when no row points at it and no claim names it. */
export async function removeIfUnused(db: Db, key: string): Promise<boolean> {
  return inTransaction(db, async (trx) => {
    await lockKey(trx, key)
    if ((await keysInUse(trx, [key])).size) return false
    await deleteObject(key)
    return true
  })
}

/**
 * Removes stored files older than `minAgeS` that nothing points at or claims, and drops
 * claims older than that (their requests died). Returns how many files were removed.
 */
export async function sweepOrphans(db: Db, o: { minAgeS: number; now?: Date }): Promise<number> {
  const cutoff = new Date((o.now ?? new Date()).getTime() - o.minAgeS * 1000)
  await db.deleteFrom('object_claim').where('claimed_at', '<', cutoff).execute()
  let removed = 0
  for (const prefix of STORED_PREFIXES) {
    let token: string | undefined
    do {
      const page = await listObjects(prefix, token)
      token = page.next
      const old = page.objects.filter((x) => x.lastModified < cutoff).map((x) => x.key)
      // One query for the page first; each candidate is checked again under its lock.
      const used = await keysInUse(db, old)
      for (const key of old) if (!used.has(key) && await removeIfUnused(db, key)) removed++
    } while (token)
  }
  return removed
}
