import { describe, expect, it, inject } from 'vitest'
import { execFile } from 'node:child_process'
import { promisify } from 'node:util'
import { ApiClient, uniqueEmail } from '../support/client'
import { testDb } from '../support/db'

const run = promisify(execFile)

describe('npm run create-mentor', () => {
  it('makes a mentor and prints a one-time link that sets the password', async () => {
    const email = uniqueEmail('first.mentor')
    const { stdout } = await run(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'scripts/create-mentor.ts', '--email', email, '--name', 'Rosalind Achterberg', '--program', 'Harbourline Robotics', '--join'], {
      env: { ...process.env, NUXT_DATABASE_URL: inject('databaseUrl'), NUXT_PUBLIC_BASE_URL: inject('baseUrl') },
    })
    const link = stdout.match(/https?:\/\/\S+\/reset\/\S+/)![0]
    const token = link.split('/').pop()!
    const guest = new ApiClient()
    expect((await guest.get(`/api/password-resets/${token}`)).body).toEqual({ email, purpose: 'welcome' })
    expect((await guest.post(`/api/password-resets/${token}`, { password: 'first-mentor-pw' })).body).toEqual({ home: '/program' })
    expect((await guest.get('/api/me')).body.isMentor).toBe(true)
    expect((await new ApiClient().get(`/api/password-resets/${token}`)).status).toBe(410)
    await expect(run(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'scripts/create-mentor.ts', '--email', email, '--name', 'Again', '--program', 'Harbourline Robotics', '--join'], {
      env: { ...process.env, NUXT_DATABASE_URL: inject('databaseUrl') },
    })).rejects.toThrow(/already/)
  })
})

describe('npm run create-mentor with --program', () => {
  const cli = (args: string[]) => run(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'scripts/create-mentor.ts', ...args], {
    env: { ...process.env, NUXT_DATABASE_URL: inject('databaseUrl'), NUXT_PUBLIC_BASE_URL: inject('baseUrl') },
  })

  it('creates the named program, refuses a name that exists, and joins it only when told to', async () => {
    const program = `Gullwing Makers ${Date.now()}`
    const first = uniqueEmail('gullwing.first')
    await cli(['--email', first, '--name', 'Saoirse Valdemar', '--program', program, '--school', 'Fictional Tideway College'])
    const db = testDb()
    const row = await db.selectFrom('program').select(['id', 'school']).where('name', '=', program).executeTakeFirstOrThrow()
    expect(row.school).toBe('Fictional Tideway College')
    const user = await db.selectFrom('users').select('program_id').where('email', '=', first).executeTakeFirstOrThrow()
    expect(user.program_id).toBe(row.id)
    await expect(cli(['--email', uniqueEmail('gullwing.second'), '--name', 'Second', '--program', program])).rejects.toThrow(/exists/)
    const second = uniqueEmail('gullwing.joiner')
    await cli(['--email', second, '--name', 'Joiner', '--program', program, '--join'])
    expect((await db.selectFrom('users').select('program_id').where('email', '=', second).executeTakeFirstOrThrow()).program_id).toBe(row.id)
  })
})
