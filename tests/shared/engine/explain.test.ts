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
