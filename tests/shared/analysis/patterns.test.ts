import { describe, it, expect } from 'vitest'
import { predictPolarPattern, labFrame, rotateToSample, solveTensorForm, flatIndex } from '../../../shared/engine'
import type { PatternModel } from '../../../shared/analysis'
import {
  predictPattern,
  buildLabTensor,
  describePatternBasis,
  findDominantHarmonic,
  PATTERN_ASSUMPTIONS,
} from '../../../shared/analysis'
import { sweepAngles } from './seeded'

const rad = (d: number) => (d * Math.PI) / 180
const angles = sweepAngles(2.5)

// Y. Li et al., "Probing symmetry properties of few-layer MoS2 and h-BN by optical second-harmonic
// generation", Nano Lett. 13, 3329 (2013): for a D3h (-6m2) monolayer at normal incidence
// I_par ∝ cos²(3θ), I_perp ∝ sin²(3θ), θ from the armchair direction. The engine's standard
// setting puts a mirror ⟂ crystal x, so the armchair direction (which lies in a mirror) is crystal
// y and the zigzag direction is crystal x: reference = [0,1,0] puts the armchair direction on lab x.
describe('D3h monolayer rotational anisotropy (Li et al., Nano Lett. 13, 3329 (2013))', () => {
  const model: PatternModel = { pointGroup: '-6m2', normal: [0, 0, 1], reference: [0, 1, 0], order: 2 }

  it('I_par ∝ cos²(3θ), I_perp ∝ sin²(3θ), θ from the armchair direction', () => {
    const p = predictPattern(model, undefined, 0, angles)
    const max = Math.max(...p.map((x) => x.parallel))
    expect(max).toBeGreaterThan(0)
    for (const x of p) {
      expect(x.parallel / max).toBeCloseTo(Math.cos(3 * rad(x.angleDeg)) ** 2, 12)
      expect(x.perpendicular / max).toBeCloseTo(Math.sin(3 * rad(x.angleDeg)) ** 2, 12)
    }
  })

  it('a crystal turned by φ gives cos²(3(θ − φ)) (azimuth convention: counter-clockwise seen from +z)', () => {
    const p = predictPattern(model, undefined, 17.3, angles)
    const max = predictPattern(model, undefined, 0, [0])[0].parallel
    for (const x of p) expect(x.parallel / max).toBeCloseTo(Math.cos(3 * rad(x.angleDeg - 17.3)) ** 2, 10)
  })

  it('can fail: measured from the zigzag direction (reference = crystal x) the parallel pattern is sin²(3θ)', () => {
    const p = predictPattern({ ...model, reference: [1, 0, 0] }, undefined, 0, [0])
    expect(p[0].parallel).toBeCloseTo(0, 12)
  })

  it("order 2 agrees with the engine's predictPolarPattern on the same lab tensor", () => {
    const [t] = solveTensorForm('-6m2', 2).tensors
    const lab = rotateToSample(t, 3, labFrame({ normal: [0, 0, 1], reference: [0, 1, 0], azimuthDeg: -40 }))
    const engine = predictPolarPattern(lab, angles)
    predictPattern(model, undefined, 40, angles).forEach((x, i) => {
      expect(x.parallel).toBeCloseTo(engine[i].parallel, 12)
      expect(x.perpendicular).toBeCloseTo(engine[i].perpendicular, 12)
    })
  })
})

// Zinc blende (-43m) on (111), lab x ∥ [1-10], z ∥ [111]: in units of d14 the in-plane d-matrix is
// d16 = d21 = −d22 = √(2/3), d11 = d12 = d26 = 0 (SHAARP, npj Comput. Mater. 8, 246 (2022), suppl.
// note 5; docs/physics.md §4). With E = (cos θ, sin θ): P_x = 2 d16 E_x E_y = √(2/3) sin 2θ,
// P_y = d21 E_x² + d22 E_y² = √(2/3) cos 2θ, so P·e_θ = √(2/3) sin 3θ and P·e_θ+90° = √(2/3) cos 3θ:
// I_par = (2/3) sin²(3θ) (six lobes), I_perp = (2/3) cos²(3θ), and without analyser 2/3 (isotropic).
describe('(111) zinc-blende six-fold pattern (closed form from the SHAARP d-matrix)', () => {
  const model: PatternModel = { pointGroup: '-43m', normal: [1, 1, 1], reference: [1, -1, 0], order: 2 }
  const p = predictPattern(model, undefined, 0, angles)

  it('equals the closed form at every angle, in units of d14', () => {
    for (const x of p) {
      expect(x.parallel).toBeCloseTo((2 / 3) * Math.sin(3 * rad(x.angleDeg)) ** 2, 12)
      expect(x.perpendicular).toBeCloseTo((2 / 3) * Math.cos(3 * rad(x.angleDeg)) ** 2, 12)
      expect(x.none).toBeCloseTo(2 / 3, 12)
    }
  })

  it('has six lobes with the parallel analyser, none without analyser', () => {
    expect(
      findDominantHarmonic(
        angles,
        p.map((x) => x.parallel),
      ).fold,
    ).toBe(6)
    expect(
      findDominantHarmonic(
        angles,
        p.map((x) => x.none),
      ).fold,
    ).toBe(0)
  })
})

// (001) zinc blende, x ∥ [100]: the only χ(2) elements with an in-plane output index need E_z
// (P_x = 2 d14 E_y E_z, P_y = 2 d14 E_x E_z), so at normal incidence the bulk gives NO in-plane
// harmonic field; the generated P_z = 2 d14 E_x E_y = d14 sin 2θ has the four-fold sin²(2θ)
// dependence familiar from (001) GaAs rotational-anisotropy work (common practice), which is seen
// only off the normal (oblique incidence or high-NA collection). Consistent with docs/physics.md §4:
// a (001) disk emits no SH along the normal.
describe('(001) zinc blende at normal incidence (common practice; docs/physics.md §4)', () => {
  const p = predictPattern(
    { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0], order: 2 },
    undefined,
    0,
    angles,
  )

  it('radiates nothing along the normal for any analyser', () => {
    for (const x of p) expect(Math.max(x.parallel, x.perpendicular, x.none)).toBeLessThan(1e-24)
  })

  it('its out-of-plane source P_z² ∝ sin²(2θ) is four-fold', () => {
    for (const x of p) expect(x.normal).toBeCloseTo(Math.sin(2 * rad(x.angleDeg)) ** 2, 12)
    expect(
      findDominantHarmonic(
        angles,
        p.map((x) => x.normal),
      ).fold,
    ).toBe(4)
  })
})

// THG of a cubic crystal (m-3m, (001), x ∥ [100]) with χ_xxxx = a and χ_xxyy = χ_xyxy = χ_xyyx = b:
// P_x = a E_x³ + 3b E_x E_y², P_y = a E_y³ + 3b E_y E_x², so P·e_θ = a + (6b − 2a) sin²(2θ)/4 and
// P·e_θ+90° = (3b − a) sin(4θ)/4; the perpendicular signal vanishes for the isotropic relation
// χ_xxxx = χ_xxyy + χ_xyxy + χ_xyyx (Boyd, Nonlinear Optics, §1.5).
describe('order 3: cubic (001) THG closed form (derived here; isotropic limit from Boyd §1.5)', () => {
  const model: PatternModel = { pointGroup: 'm-3m', normal: [0, 0, 1], reference: [1, 0, 0], order: 3 }

  it("matches the closed form with the tensor's own a and b", () => {
    const t = buildLabTensor(model, [1, 0.2])
    const [a, b] = [t[flatIndex('xxxx')], t[flatIndex('xxyy')]]
    expect(b).toBeCloseTo(0.2, 12)
    for (const x of predictPattern(model, [1, 0.2], 0, angles)) {
      const th = rad(x.angleDeg)
      expect(x.parallel).toBeCloseTo((a + ((6 * b - 2 * a) * Math.sin(2 * th) ** 2) / 4) ** 2, 12)
      expect(x.perpendicular).toBeCloseTo((((3 * b - a) * Math.sin(4 * th)) / 4) ** 2, 12)
    }
  })

  it('is isotropic when χ_xxxx = 3 χ_xxyy (no perpendicular signal, flat parallel pattern)', () => {
    for (const x of predictPattern(model, [3, 1], 25, angles)) {
      expect(x.perpendicular).toBeCloseTo(0, 12)
      expect(x.parallel).toBeCloseTo(9, 12)
    }
  })
})

describe('model inputs', () => {
  it("labels the independent components in the engine's standard setting", () => {
    expect(
      describePatternBasis({ pointGroup: '6mm', normal: [1, 0, 0], reference: [0, 0, 1], order: 2 }).labels,
    ).toEqual(['d15', 'd31', 'd33'])
  })

  it('rejects the wrong number of ratios and unsupported orders', () => {
    const model: PatternModel = { pointGroup: '6mm', normal: [0, 0, 1], reference: [1, 0, 0], order: 2 }
    expect(() => predictPattern(model, [1, 2], 0, [0])).toThrow(/give 3 finite ratios.*d15, d31, d33/)
    expect(() => predictPattern({ ...model, order: 4 }, undefined, 0, [0])).toThrow(/orders 2 and 3/)
  })

  it("states the model's assumptions for the UI", () => {
    expect(PATTERN_ASSUMPTIONS.join(' ')).toMatch(/normal incidence.*bulk.*Fresnel.*NA/s)
  })
})
