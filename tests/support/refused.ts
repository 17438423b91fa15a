// A statement the database must refuse, run in a savepoint so one refusal does not end the
// test's transaction.
import { sql, type RawBuilder, type Transaction } from 'kysely'
import type { Database } from '../../server/db/schema'

let n = 0
/** The database's refusal of one statement, as "constraint: message"; fails the test if it went through. */
export async function refused(trx: Transaction<Database>, statement: RawBuilder<unknown>): Promise<string> {
  const sp = sql.raw(`refusal_${++n}`)
  await sql`savepoint ${sp}`.execute(trx)
  try {
    await statement.execute(trx)
  } catch (err) {
    await sql`rollback to savepoint ${sp}`.execute(trx)
    const e = err as { constraint?: string; message: string }
    return `${e.constraint ?? ''}: ${e.message}`
  }
  await sql`rollback to savepoint ${sp}`.execute(trx)
  throw new Error(`the database accepted: ${statement.compile(trx).sql}`)
}
