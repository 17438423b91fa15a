// `npm run create-mentor -- --email a@b.org --name "A Person" [--program "Name"] [--school "Name"]`
// Makes the first mentor of a new installation and prints a one-time link to set a password.
// Reads NUXT_DATABASE_URL; without it, uses the local cluster that `npm start` keeps in storage/.
import { parseArgs } from 'node:util'
import { existsSync, readFileSync } from 'node:fs'
import path from 'node:path'
import { createDb, migrateToLatest } from '../server/db/connect'
import { newToken, WELCOME_TTL_MS } from '../server/platform/tokens'

const { values } = parseArgs({
  options: { email: { type: 'string' }, name: { type: 'string' }, program: { type: 'string' }, school: { type: 'string' } },
})

function fail(message: string): never {
  console.error(message)
  process.exit(1)
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
      let program = await trx.selectFrom('program').select('id').orderBy('id').limit(1).executeTakeFirst()
      program ??= await trx.insertInto('program').values({ name: values.program ?? 'Robotics program', school: values.school ?? '' }).returning('id').executeTakeFirstOrThrow()
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
