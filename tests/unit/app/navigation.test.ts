import { describe, expect, it } from 'vitest'
import type { Me } from '../../../shared/types/api'
import { ACTIONS, type Action, type Can } from '../../../shared/types/policy'
import { isUnder, navigation, refusalSentence } from '../../../app/utils/navigation'

function me(allowed: Action[], o: Partial<Me> = {}): Me {
  const can = Object.fromEntries(ACTIONS.map((a) => [a, allowed.includes(a)])) as Can
  return {
    user: { id: 1, name: 'Test Person', email: 't@example.test' },
    program: { id: 1, name: 'A program', school: 'A school', laserWorkArea: null },
    isMentor: false, roles: [], teams: [], home: '/studio', mailFake: true, can, ...o,
  }
}

describe('the shell navigation', () => {
  it('gives a mentor at most five places in the bar, the program pages in one menu', () => {
    const nav = navigation(me(['program.manage', 'revision.review', 'artwork.upload', 'queue.work', 'people.manage', 'audit.view', 'mail.view'], { isMentor: true }))
    expect(nav.work.map((i) => i.label)).toEqual(['Reviews', 'Artworks', 'Robots', 'Lab'])
    expect(nav.program.map((i) => i.label)).toEqual(['Overview', 'Teams', 'Competition rules', 'People', 'Films', 'Materials', 'Activity', 'Mail'])
  })

  it('shows a student neither the mentor pages nor the lab', () => {
    const nav = navigation(me(['artwork.upload', 'mail.view']))
    const all = [...nav.work, ...nav.program].map((i) => i.to)
    for (const page of ['/people', '/activity', '/program', '/rules', '/reviews', '/lab']) expect(all).not.toContain(page)
    expect(navigation(me(['artwork.upload', 'mail.view'], { mailFake: false })).program.map((i) => i.to)).not.toContain('/mail')
  })

  it('keeps an item lit on the pages beneath it only', () => {
    expect(isUnder('/teams/4', '/teams')).toBe(true)
    expect(isUnder('/teamsx', '/teams')).toBe(false)
  })

  it('says who a refused page is for', () => {
    expect(refusalSentence('people.manage')).toMatch(/is for the program’s mentors/)
    expect(refusalSentence('queue.work')).toMatch(/operators/)
    expect(refusalSentence(undefined)).toMatch(/other roles/)
  })
})
