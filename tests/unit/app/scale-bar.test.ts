import { describe, expect, it } from 'vitest'
import { niceLength } from '../../../app/utils/scale-bar'

describe('scale bar length', () => {
  it('picks the longest 1-2-5 length that fits', () => {
    // At 2 px/mm and 110 px: 50 mm is 100 px (fits), 100 mm would be 200 px.
    expect(niceLength(2, 110)).toEqual({ mm: 50, px: 100 })
    // At 4 px/mm and 160 px: 20 mm is 80 px, 50 mm would be 200 px.
    expect(niceLength(4, 160)).toEqual({ mm: 20, px: 80 })
    // Never shorter than 1 mm, however small the room.
    expect(niceLength(4, 1).mm).toBe(1)
  })
})
