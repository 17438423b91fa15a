// `npm run create-mentor -- --email a@b.org --name "A Person" [--program "Name" [--school "Name"] [--join]]`
// Makes a mentor and prints a one-time link to set a password. With --program, a new program
// of that name is made (refused when the name is taken, unless --join asks to join it);
// without it, the installation's only program is joined (or a first one made).
// Reads NUXT_DATABASE_URL; without it, uses the local cluster that `npm start` keeps in storage/.
import { parseArgs } from 'node:util'
import { existsSync, readFileSync } from 'node:fs'
import path from 'node:path'
import type { Transaction } from 'kysely'
import { createDb, migrateToLatest } from '../server/db/connect'
import type { Database } from '../server/db/schema'
import { newToken, WELCOME_TTL_MS } from '../server/platform/tokens'

const { values } = parseArgs({
  options: { email: { type: 'string' }, name: { type: 'string' }, program: { type: 'string' }, school: { type: 'string' }, join: { type: 'boolean' } },
})

function fail(message: string): never {
  console.error(message)
  process.exit(1)
}

/** The program the new mentor belongs to, made or found as the options say. */
async function chooseProgram(trx: Transaction<Database>): Promise<{ id: number }> {
  const wanted = values.program?.trim()
  if (wanted) {
    const existing = await trx.selectFrom('program').select('id').where('name', '=', wanted).executeTakeFirst()
    if (existing && values.join) return existing
    if (existing) fail(`A program named "${wanted}" exists already. Add --join to make this person a mentor of it, or choose another name.`)
    return trx.insertInto('program').values({ name: wanted, school: values.school?.trim() ?? '' }).returning('id').executeTakeFirstOrThrow()
  }
  if (values.join) fail('--join needs --program "Name" of the program to join.')
  const programs = await trx.selectFrom('program').select(['id', 'name']).orderBy('id').limit(2).execute()
  if (programs.length > 1) fail('This installation has several programs: say which with --program "Name" --join, or make a new one with --program "Name".')
  return programs[0] ?? trx.insertInto('program').values({ name: 'Robotics program', school: values.school?.trim() ?? '' }).returning('id').executeTakeFirstOrThrow()
}

async function main() {
  const email = values.email?.trim().toLowerCase()
  const name = values.name?.trim()
  if (!email || !/^[^@\s]+@[^@\s]+\.[^@\s]+$/.test(email)) fail('Give an e-mail address: --email someone@example.org')
  if (!name) fail('Give a name: --name "Full Name"')
  let url = process.env.NUXT_DATABASE_URL
  if (!url) {
    const pwFile = path.resolve(process.env.DECALWRIGHT_STORAGE ?? 'storage', 'postgres', 'password')
    if (!existsSync(pwFile)) fail('Set NUXT_DATABASE_URL, or run "npm start" once so the local database exists (and keep it running).')
    url = `postgres://decalwright:${encodeURIComponent(readFileSync(pwFile, 'utf8').trim())}@127.0.0.1:${process.env.DECALWRIGHT_PG_PORT ?? 54329}/decalwright`
  }
  const db = createDb(url, 1)
  try {
    await migrateToLatest(db)
    const { token, hash } = newToken()
    await db.transaction().execute(async (trx) => {
      if (await trx.selectFrom('users').select('id').where('email', '=', email).executeTakeFirst()) fail(`There is an account for ${email} already.`)
      const program = await chooseProgram(trx)
      const user = await trx.insertInto('users').values({ program_id: program.id, email, name }).returning('id').executeTakeFirstOrThrow()
      await trx.insertInto('mentorship').values({ user_id: user.id, program_id: program.id }).execute()
      await trx.insertInto('password_reset').values({
        user_id: user.id, purpose: 'welcome', token_hash: hash,
        expires_at: new Date(Date.now() + WELCOME_TTL_MS),
      }).execute()
      await trx.insertInto('audit_event').values({ program_id: program.id, actor_id: null, action: 'create-mentor', subject_type: 'user', subject_id: String(user.id), detail: JSON.stringify({ email, via: 'command' }) }).execute()
    })
    const base = process.env.NUXT_PUBLIC_BASE_URL ?? 'http://localhost:3000'
    console.log(`Mentor ${name} <${email}> created.`)
    console.log(`Set the password within 3 days, once, at:\n${new URL(`/reset/${token}`, base)}`)
  } catch (err) {
    fail(err instanceof Error ? err.message : String(err))
  } finally {
    await db.destroy()
  }
}

void main()
