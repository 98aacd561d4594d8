import { describe, expect, it } from 'vitest'
import { alternativeView, insideCap } from '../../shared/deals/alternative'
import { combinationFields } from '../../shared/schemas/build'
import { alternativeSchema, changeOrderSchema } from '../../shared/schemas/deals'

const alternative = {
  boreIn: 4.03, strokeIn: 3.48, cylinders: 8, cylinderHeads: 'Aluminium, 195 cc', camIntakeDurationDeg: 224,
  camExhaustDurationDeg: 230, camLobeSeparationDeg: 112, camshaft: 'Hydraulic roller',
}

describe('a quote\'s alternative combination', () => {
  it('computes its displacement: 4.030 in × 3.480 in × 8 is about 355 ci (π/4 · bore² · stroke · cylinders, textbook geometry)', () => {
    const view = alternativeView(alternativeSchema.parse(alternative))
    expect(view.displacementCi).toBeCloseTo((Math.PI / 4) * 4.03 ** 2 * 3.48 * 8, 9)
    expect(view.displacementCi).toBeCloseTo(355.1, 1)
    expect(view.note).toBe('')
  })

  it('takes the build editor\'s bounds for bore and stroke, at both ends', () => {
    for (const key of ['boreIn', 'strokeIn'] as const) {
      const build = combinationFields[key]
      for (const edge of [1.5, 6.5]) {
        expect(alternativeSchema.safeParse({ ...alternative, [key]: edge }).success).toBe(true)
        expect(build.safeParse(edge).success).toBe(true)
      }
      for (const outside of [1.49, 6.51, Number.NaN, Number.POSITIVE_INFINITY]) {
        expect(alternativeSchema.safeParse({ ...alternative, [key]: outside }).success).toBe(false)
        expect(build.safeParse(outside).success).toBe(false)
      }
    }
  })

  it('says whether it is inside a cap, and nothing without one', () => {
    expect(insideCap(355.1, 360)).toBe(true)
    expect(insideCap(360, 360)).toBe(true)
    expect(insideCap(360.01, 360)).toBe(false)
    expect(insideCap(355.1, null)).toBeNull()
  })
})

describe('a change order\'s schema', () => {
  const plan = { totalCents: 100_000, milestones: [{ title: 'Rest', deliverable: 'The engine', amountCents: 100_000, dueDate: '2031-05-01' }] }
  it('needs a milestone and whole cents, and defaults the line items and notes', () => {
    expect(changeOrderSchema.parse(plan)).toMatchObject({ lineItems: [], notes: '' })
    expect(changeOrderSchema.safeParse({ ...plan, milestones: [] }).success).toBe(false)
    expect(changeOrderSchema.safeParse({ ...plan, totalCents: 100.5 }).success).toBe(false)
    expect(changeOrderSchema.safeParse({ ...plan, totalCents: 99 }).success).toBe(false)
  })
})
