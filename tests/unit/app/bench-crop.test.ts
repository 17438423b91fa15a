import { describe, expect, it } from 'vitest'
import { CROP_HANDLES, cropHandlePoint, cropHandleWords, cropWithHandleAt } from '../../../app/utils/bench-crop'
import { CROP_MIN_PX } from '../../../app/utils/bench-view'

describe('the crop\'s handles', () => {
  const world = { width: 1200, height: 800 }
  const crop = { x: 100, y: 50, width: 400, height: 300 }

  it('sit on the middle of each edge and at the centre', () => {
    expect(CROP_HANDLES.map((h) => cropHandlePoint(crop, h))).toEqual([
      { x: 100, y: 200 }, { x: 300, y: 50 }, { x: 500, y: 200 }, { x: 300, y: 350 }, { x: 300, y: 200 },
    ])
  })

  it('move one edge across its own axis, keeping the opposite edge', () => {
    expect(cropWithHandleAt(crop, 'left', { x: 150.4, y: 999 }, world)).toEqual({ x: 150, y: 50, width: 350, height: 300 })
    expect(cropWithHandleAt(crop, 'right', { x: 620, y: 0 }, world)).toEqual({ x: 100, y: 50, width: 520, height: 300 })
    expect(cropWithHandleAt(crop, 'top', { x: 0, y: 10 }, world)).toEqual({ x: 100, y: 10, width: 400, height: 340 })
    expect(cropWithHandleAt(crop, 'bottom', { x: 0, y: 400 }, world)).toEqual({ x: 100, y: 50, width: 400, height: 350 })
  })

  it('stay inside the source and never pass the opposite edge', () => {
    expect(cropWithHandleAt(crop, 'left', { x: -40, y: 0 }, world)).toEqual({ x: 0, y: 50, width: 500, height: 300 })
    expect(cropWithHandleAt(crop, 'left', { x: 900, y: 0 }, world)).toEqual({ x: 500 - CROP_MIN_PX, y: 50, width: CROP_MIN_PX, height: 300 })
    expect(cropWithHandleAt(crop, 'bottom', { x: 0, y: 5000 }, world).height).toBe(750)
    expect(cropWithHandleAt(crop, 'top', { x: 0, y: 9999 }, world)).toEqual({ x: 100, y: 350 - CROP_MIN_PX, width: 400, height: CROP_MIN_PX })
  })

  it('move the whole crop by its centre, at its size, inside the source', () => {
    expect(cropWithHandleAt(crop, 'whole', { x: 600, y: 400 }, world)).toEqual({ x: 400, y: 250, width: 400, height: 300 })
    expect(cropWithHandleAt(crop, 'whole', { x: 1190, y: 790 }, world)).toEqual({ x: 800, y: 500, width: 400, height: 300 })
    expect(cropWithHandleAt(crop, 'whole', { x: -10, y: -10 }, world)).toEqual({ x: 0, y: 0, width: 400, height: 300 })
  })

  it('say where they are in words', () => {
    expect(cropHandleWords(crop, 'left')).toBe('left edge of the crop at 100 px')
    expect(cropHandleWords(crop, 'bottom')).toBe('bottom edge of the crop at 350 px')
    expect(cropHandleWords(crop, 'whole')).toBe('whole crop, 400 × 300 px from 100, 50')
  })
})
