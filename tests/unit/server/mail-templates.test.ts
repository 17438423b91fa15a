import { describe, expect, it } from 'vitest'
import { invitationMail, resetMail } from '../../../server/mail/templates'

describe('mail templates', () => {
  it('puts the link in both parts and escapes names in the HTML part', () => {
    const m = invitationMail({ to: 'x@y.example', name: '<b>Ro</b>', inviter: 'Mentor & Co', programName: 'P', role: 'designer', teamName: 'T', url: 'https://app.example/invitations/abc' })
    expect(m.text).toContain('https://app.example/invitations/abc')
    expect(m.html).toContain('href="https://app.example/invitations/abc"')
    expect(m.html).toContain('&lt;b&gt;Ro&lt;/b&gt;')
    expect(m.html).not.toContain('<b>Ro</b>')
    expect(m.html).toContain('Mentor &amp; Co')
    expect(m.text).toContain('as a designer on T')
  })

  it('says how long a reset link lasts', () => {
    expect(resetMail({ to: 'a@b.example', name: 'A', url: 'u' }).text).toMatch(/expires in one hour/)
  })
})
