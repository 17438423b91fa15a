import { describe, expect, it } from 'vitest'
import { planPlacementChange } from '../../../server/robots/plan'

const before = { spot: 'left side panel', widthMm: 50, quantity: 2, spares: 1, sparesOnHand: 2 }

describe('what a placement\'s change asks of the cut queue', () => {
  it('a new spot asks for nothing', () => {
    expect(planPlacementChange(before, { spot: 'front bumper' })).toMatchObject({ copiesToQueue: 0, resized: false, surplus: 0, changes: { spot: { from: 'left side panel', to: 'front bumper' } } })
  })
  it('more copies or spares queue the difference; fewer leave a surplus', () => {
    expect(planPlacementChange(before, { quantity: 4, spares: 2 })).toMatchObject({ copiesToQueue: 3, surplus: 0 })
    expect(planPlacementChange(before, { quantity: 1 })).toMatchObject({ copiesToQueue: 0, surplus: 1 })
    expect(planPlacementChange(before, { quantity: 3, spares: 0 })).toMatchObject({ copiesToQueue: 0, surplus: 0, changes: { quantity: { from: 2, to: 3 }, spares: { from: 1, to: 0 } } })
  })
  it('a new width asks for every copy again and sets the spares at the old size aside', () => {
    expect(planPlacementChange(before, { widthMm: 60, spares: 2 })).toMatchObject({ resized: true, copiesToQueue: 4, setAside: 2, surplus: 0 })
  })
  it('the same values change nothing', () => {
    expect(planPlacementChange(before, { widthMm: 50, quantity: 2 })).toMatchObject({ changes: {}, copiesToQueue: 0, resized: false })
  })
})
