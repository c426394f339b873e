import { describe, it, expect } from 'vitest'
import { computeChannels } from '../../../shared/engine'

describe('explain: plain-language derivation', () => {
  it('names the cut, the crystal class and its Q', () => {
    const r = computeChannels({
      crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
      structure: { rotationOrder: 0, mirrors: [0] },
      pump: { type: 'circular', m: 1 },
      order: 2,
    })
    expect(r.explain).toContain(
      'the (001) cut of a -43m crystal carries Δm = ±2 only (weights ±2: 100%); Q does not depend on the in-plane azimuth',
    )
    expect(r.explain[0]).toMatch(/d14 = d25 = d36/)
    expect(r.explain.some((s) => /^rule 6: neither m = \+1 nor m = −1/.test(s))).toBe(true)
  })

  it('says why a centrosymmetric bulk is silent', () => {
    const r = computeChannels({
      crystal: { pointGroup: 'm-3m', normal: [0, 0, 1], reference: [1, 0, 0] },
      structure: { rotationOrder: 0 },
      pump: { type: 'linear', angle: 0 },
      order: 2,
    })
    expect(r.explain[0]).toMatch(/vanishes in the bulk of class m-3m.*contains inversion/)
  })

  it('names non-cubic cuts by axis and states the co/counter relation', () => {
    const r = computeChannels({
      crystal: { pointGroup: '3m', normal: 'Z', reference: 'X' },
      structure: { rotationOrder: 0 },
      pump: { type: 'circular', m: 1 },
      order: 2,
    })
    expect(r.explain.some((s) => s.startsWith('the Z-cut of a 3m crystal carries Δm = 0, ±3'))).toBe(true)
    expect(r.explain.some((s) => /m = −1 counter-rotating/.test(s))).toBe(true)
  })
})

describe('explanations of many mirrors', () => {
  // A body of revolution has every vertical mirror (C∞v, the Curie group of a cone: common
  // practice); the 12 lines a request samples every 15° are one fact, and mirrors without a parity
  // rule are named together per reason.
  it('a body of revolution gets one structure line and one line per reason, not one per 15°', () => {
    const r = computeChannels({
      crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
      structure: { rotationOrder: 0, mirrors: Array.from({ length: 12 }, (_, k) => k * 15) },
      pump: { type: 'linear', angle: 0 },
      order: 2,
    })
    const structure = r.explain.filter((s) => s.startsWith('structure:'))
    expect(structure).toEqual([
      'structure: C∞v, rotation order ∞ (body of revolution), every vertical mirror (the 12 lines given, 0° … 165°, stand for them)',
    ])
    expect(r.explain.filter((s) => s.startsWith('no parity rule'))).toHaveLength(2)
    expect(r.explain).toContain(
      'no parity rule at the mirrors 45° and 135°: the pump has no definite parity under them',
    )
    expect(r.explain.filter((s) => s.startsWith('rule 5'))).toHaveLength(2)
  })
})
