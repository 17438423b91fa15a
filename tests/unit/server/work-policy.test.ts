import { describe, expect, it } from 'vitest'
import { canCancelWork, canFollowWork, type Actor } from '../../../server/policy'

function actor(id: number, programId: number, isMentor: boolean): Actor {
  return { id, name: 'A', email: 'a@x.example', programId, isMentor, memberships: new Map([[7, 'designer']]), ip: null }
}

const work = { programId: 1, askedBy: 10 }

describe('background work belongs to who asked for it', () => {
  it('is followed by the asker and the program\'s mentors, nobody else', () => {
    expect(canFollowWork(actor(10, 1, false), work)).toBe(true)
    expect(canFollowWork(actor(11, 1, false), work)).toBe(false)
    expect(canFollowWork(actor(12, 1, true), work)).toBe(true)
    expect(canFollowWork(actor(13, 2, true), work)).toBe(false)
    // The same user id in another program is someone else.
    expect(canFollowWork(actor(10, 2, false), work)).toBe(false)
  })

  it('is cancelled by the asker only', () => {
    expect(canCancelWork(actor(10, 1, false), work)).toBe(true)
    expect(canCancelWork(actor(12, 1, true), work)).toBe(false)
    expect(canCancelWork(actor(11, 1, false), work)).toBe(false)
  })
})
