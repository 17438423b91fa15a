import { describe, expect, it } from 'vitest'
import { matchesSearch } from '../../../app/utils/search'

describe('searching a list in the page', () => {
  it('finds every word in some field, whatever the case or accents', () => {
    const person = ['Zoë Ashgrove-Lund', 'zoe@example.test', 'Copper Wrens']
    expect(matchesSearch(person, '')).toBe(true)
    expect(matchesSearch(person, 'zoe')).toBe(true)
    expect(matchesSearch(person, 'ASHGROVE wrens')).toBe(true)
    expect(matchesSearch(person, 'ashgrove sprockets')).toBe(false)
    expect(matchesSearch([null, 'Review requested: Heron'], 'heron')).toBe(true)
  })
})
