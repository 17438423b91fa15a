import { describe, expect, it } from 'vitest'
import { createError } from 'h3'
import { refusal } from '../../../../server/work/tasks'

describe('what the queue takes for a refusal', () => {
  it('keeps a 4xx answer as it was, to be given to the request unchanged', () => {
    const err = createError({ statusCode: 422, message: 'Not a drawing.', data: { kind: 'not-a-drawing' } })
    expect(refusal(err)).toEqual({ status: 422, message: 'Not a drawing.', data: { kind: 'not-a-drawing' } })
    expect(refusal(createError({ statusCode: 400, message: 'Bad settings.' }))).toEqual({ status: 400, message: 'Bad settings.' })
  })

  it('tries again after anything else: a busy pool, a store that did not answer, a plain error', () => {
    expect(refusal(createError({ statusCode: 503, message: 'Busy.' }))).toBeUndefined()
    expect(refusal(new Error('connection reset'))).toBeUndefined()
    expect(refusal(createError({ statusCode: 499, message: 'Withdrawn.' }))).toBeUndefined()
  })
})
