// Smaller defects of the same classes: page headers, odd query strings, degenerate uploads,
// loose number parsing, and what students see of each other.
import sharp from 'sharp'
import { describe, expect, it, inject } from 'vitest'
import { ApiClient, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { teamId } from '../support/scenario'
import { drawing } from '../support/images'
import { uploadArtwork } from '../support/upload'

describe('page headers', () => {
  it('every page carries a content security policy that forbids framing, nosniff and a referrer policy', async () => {
    for (const path of ['/sign-in', '/']) {
      const r = await fetch(new URL(path, inject('baseUrl')), { redirect: 'manual' })
      const csp = r.headers.get('content-security-policy') ?? ''
      expect(csp, path).toMatch(/frame-ancestors 'none'/)
      expect(csp, path).toMatch(/default-src 'self'|script-src/)
      expect(r.headers.get('x-content-type-options'), path).toBe('nosniff')
      expect(r.headers.get('referrer-policy'), path).toMatch(/same-origin|strict-origin|no-referrer/)
    }
  })
})

describe('odd query strings', () => {
  it('a tab or newline in ?next= is refused as a destination, not answered with 500', async () => {
    const signedInClient = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    for (const next of ['/%09/evil.example', '/%0A/evil.example', '%09', '/\\evil.example']) {
      for (const c of [new ApiClient(), signedInClient]) {
        const r = await c.request('GET', `/sign-in?next=${next}`, undefined, { accept: 'text/html' })
        expect(r.status, `${next} ${c.cookies.size ? 'signed in' : 'signed out'}`).toBeLessThan(500)
        expect(r.headers.get('location') ?? '').not.toMatch(/evil\.example/)
      }
    }
  })
})

describe('degenerate uploads', () => {
  it('a 1 × 1 picture and a page with no ink get a plain answer, and nothing is stored', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const wrens = await teamId()
    const tiny = await sharp({ create: { width: 1, height: 1, channels: 3, background: '#000000' } }).png().toBuffer()
    const blank = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#f6f3ec' } }).jpeg().toBuffer()
    for (const [name, file] of [['tiny', tiny], ['blank', blank]] as const) {
      const title = `Degenerate ${name} ${Date.now()}`
      const r = await uploadArtwork(student, { file, title, teamId: wrens, widthMm: 80 })
      expect(r.status, `${name}: ${JSON.stringify(r.body)}`).toBe(422)
      expect(r.body.message.length).toBeGreaterThan(20)
      expect(await testDb().selectFrom('artwork').select('id').where('title', '=', title).executeTakeFirst()).toBeUndefined()
    }
  })

  it('a width is a plain decimal number: "0x10" is not 16', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    for (const widthMm of ['0x10', '1e2', ' ', '12abc']) {
      const r = await uploadArtwork(student, { file: await drawing('png', 300, 200), title: 'Hex width', teamId: await teamId(), widthMm })
      expect(r.status, widthMm).toBe(400)
      expect(r.body.data.fieldErrors.widthMm, widthMm).toBeTruthy()
    }
  })
})

describe('what students see of each other', () => {
  it('names, not e-mail addresses', async () => {
    const wrens = await teamId()
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const team = (await student.get(`/api/teams/${wrens}`)).body
    expect(team.members.length).toBeGreaterThan(1)
    for (const m of [...team.members, ...team.mentors]) {
      expect(m.name).toBeTruthy()
      expect(m.email ?? null).toBeNull()
    }
    expect(JSON.stringify(team)).not.toContain('@harbourline.example')
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    expect((await mentor.get(`/api/teams/${wrens}`)).body.members.every((m: any) => m.email.includes('@'))).toBe(true)
  })
})
