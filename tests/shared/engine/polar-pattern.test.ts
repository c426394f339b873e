import { describe, it, expect } from 'vitest'
import { predictPolarPattern, solveTensorForm, rotateToSample, labFrame } from '../../../shared/engine'

// Rotational-anisotropy SHG of a D3h (-6m2) monolayer at normal incidence:
// I_par ∝ cos²(3θ), I_perp ∝ sin²(3θ), θ measured from the armchair direction (the in-plane
// direction lying in a crystal mirror) — Y. Li et al., Nano Lett. 13, 3329 (2013).
describe('D3h monolayer polar pattern (Li et al., Nano Lett. 13, 3329 (2013))', () => {
  it('I_par ∝ cos²(3θ) and I_perp ∝ sin²(3θ) with θ from the armchair direction', () => {
    const [t] = solveTensorForm('-6m2', 2).tensors
    // Standard setting: mirror ⟂ x, so the armchair direction (inside the mirror) is y: use it as lab x.
    const lab = rotateToSample(t, 3, labFrame({ normal: [0, 0, 1], reference: [0, 1, 0] }))
    const angles = Array.from({ length: 37 }, (_, i) => i * 10)
    const pattern = predictPolarPattern(lab, angles)
    const max = Math.max(...pattern.map((p) => p.parallel))
    for (const p of pattern) {
      const a = (3 * p.angleDeg * Math.PI) / 180
      expect(p.parallel / max).toBeCloseTo(Math.cos(a) ** 2, 12)
      expect(p.perpendicular / max).toBeCloseTo(Math.sin(a) ** 2, 12)
    }
  })

  it('the check can fail: measured from the zigzag direction the pattern is sin²(3θ)', () => {
    const [t] = solveTensorForm('-6m2', 2).tensors
    const p = predictPolarPattern(t, [0])[0]
    expect(p.parallel).toBeCloseTo(0, 12)
  })

  it('rejects a tensor that is not rank 3', () => {
    expect(() => predictPolarPattern(new Float64Array(81), [0])).toThrow(/rank-3/)
  })
})
