import { describe, it, expect } from 'vitest'
import fc from 'fast-check'
import {
  computePolar,
  predictObliquePattern,
  predictPolarPattern,
  prepareSampleTensor,
  parsePolarRequest,
  polarSampleTensor,
  fresnelCrossing,
  obliqueFields,
  solveTensorForm,
  EngineError,
} from '../../../shared/engine'
import type { ObliqueGeometry, Complex } from '../../../shared/engine'

const deg = Math.PI / 180
/**
 * A number in [min, max] on a 1/1000 grid (fc.double favours tiny and extreme values, which would test nothing here).
 */
const num = (min: number, max: number) =>
  fc.integer({ min: Math.round(min * 1000), max: Math.round(max * 1000) }).map((k) => k / 1000)
const phis = Array.from({ length: 73 }, (_, i) => i * 5)
const geometry = (
  angleDeg: number,
  pumpDeg: number,
  analyserDeg: number,
  detect: 'reflection' | 'transmission' = 'reflection',
): ObliqueGeometry => ({ angleDeg, detect, pumpDeg, analyserDeg })
const P = 0
const S = 90

/** The lab-frame χ(2) of a zinc-blende cut with χ_xyz = 1 (crystal frame; the −43m basis tensor). */
const zincBlende = (normal: [number, number, number], reference: [number, number, number], azimuthDeg = 0) =>
  prepareSampleTensor({ pointGroup: '-43m', normal, reference, azimuthDeg, order: 2 }).tensors[0]

describe('(001) zinc blende, bulk electric dipole at oblique incidence', () => {
  // Derived here from χ_xyz = χ_xzy = … = 1 (−43m, x = [100]) in the geometry of docs/physics.md §6,
  // c = cos θ, s = sin θ, reflection: I_pp = c⁴s² sin²2φ, I_ps = 4c²s² cos²2φ, I_sp = s² sin²2φ,
  // I_ss = 0. The forms (p-p and s-p ∝ sin²2φ, p-s ∝ cos²2φ, no s-s and nothing at normal
  // incidence) are those reported for (001) zinc-blende crystals: T. Stehlin, M. Feller,
  // P. Guyot-Sionnest and Y. R. Shen, Opt. Lett. 13, 389 (1988); X. Song et al., "Symmetry analysis of
  // ZnSe(100)/air interface by second harmonic generation", arXiv:physics/0203023 (2002).
  const chi = zincBlende([0, 0, 1], [1, 0, 0])
  for (const theta of [30, 45, 62]) {
    const c = Math.cos(theta * deg),
      s = Math.sin(theta * deg)
    it(`θ = ${theta}°: the four p/s combinations in reflection`, () => {
      const pp = predictObliquePattern(chi, geometry(theta, P, P), phis)
      const ps = predictObliquePattern(chi, geometry(theta, P, S), phis)
      const sp = predictObliquePattern(chi, geometry(theta, S, P), phis)
      const ss = predictObliquePattern(chi, geometry(theta, S, S), phis)
      phis.forEach((phi, i) => {
        const a = 2 * phi * deg
        expect(pp[i]).toBeCloseTo(c ** 4 * s * s * Math.sin(a) ** 2, 12)
        expect(ps[i]).toBeCloseTo(4 * c * c * s * s * Math.cos(a) ** 2, 12)
        expect(sp[i]).toBeCloseTo(s * s * Math.sin(a) ** 2, 12)
        expect(ss[i]).toBeCloseTo(0, 14)
      })
    })
  }

  it('in transmission p-p is 9c⁴s² sin²2φ (p-out = (cos θ, 0, sin θ): all three terms add)', () => {
    // Same derivation with the transmitted p vector; reflection and transmission must differ.
    const theta = 40,
      c = Math.cos(theta * deg),
      s = Math.sin(theta * deg)
    const pp = predictObliquePattern(chi, geometry(theta, P, P, 'transmission'), phis)
    phis.forEach((phi, i) => expect(pp[i]).toBeCloseTo(9 * c ** 4 * s * s * Math.sin(2 * phi * deg) ** 2, 12))
  })

  it('the request path gives orders {0, 4}, points normalised to 1, and nothing at normal incidence', () => {
    const crystal = { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] }
    const pp = computePolar({ crystal, order: 2, incidence: { angleDeg: 45 }, pump: 'p', analyser: 'p', stepDeg: 15 })
    expect(pp.harmonics).toEqual([0, 4])
    expect(pp.points).toHaveLength(24)
    expect(Math.max(...pp.points.map((p) => p.intensity))).toBe(1)
    expect(pp.points.find((p) => p.azimuthDeg === 45)?.intensity).toBeCloseTo(1, 12)
    expect(pp.points.find((p) => p.azimuthDeg === 90)?.intensity).toBe(0)
    const ss = computePolar({ crystal, order: 2, incidence: { angleDeg: 45 }, pump: 's', analyser: 's' })
    expect(ss.harmonics).toEqual([])
    expect(ss.note).toMatch(/nothing is detected/)
    // Normal incidence on (001): the bulk SH polarisation is along z and radiates nothing along it
    // (Stehlin et al., Opt. Lett. 13, 389 (1988)).
    for (const [pump, analyser] of [
      ['p', 'p'],
      ['p', 's'],
      ['s', 'p'],
      ['s', 's'],
    ]) {
      const r = computePolar({ crystal, order: 2, incidence: { angleDeg: 0 }, pump, analyser })
      expect(r.harmonics).toEqual([])
      expect(r.points.every((p) => p.intensity === 0)).toBe(true)
    }
  })

  it('with an isotropic surface term p-p interferes and carries order 2: [110] and [1-10] differ', () => {
    // The bulk term alone is unchanged by φ → φ + 90° (sin²2φ), so it cannot tell [110] from [1-10];
    // its interference with the surface term in p-p can (Song et al., arXiv:physics/0203023: the
    // p-in/p-out configuration distinguishes [011] from [01-1]).
    const crystal = { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] }
    const base = { crystal, order: 2, incidence: { angleDeg: 45 }, pump: 'p', analyser: 'p', stepDeg: 45 }
    const bulk = computePolar(base)
    expect(bulk.points[1].intensity).toBeCloseTo(bulk.points[3].intensity, 12)
    const both = computePolar({ ...base, surface: true, surfaceCoefficients: { zzz: 0.4, zxx: 0.1, xxz: 0.05 } })
    expect(both.harmonics).toEqual([0, 2, 4])
    expect(Math.abs(both.points[1].intensity - both.points[3].intensity)).toBeGreaterThan(0.1)
    expect(both.coefficients).toEqual({ bulk: { xyz: 1 }, surface: { xxz: 0.05, zxx: 0.1, zzz: 0.4 } })
  })
})

describe('(111) zinc blende', () => {
  // Tensor of the C3v (111) face: p-p and s-p ∝ |a + b cos 3φ|² (three-fold) at oblique incidence,
  // p-s and s-s ∝ |c sin 3(φ − φ0)|² (six-fold), six-fold in every combination at normal incidence —
  // H. W. K. Tom, T. F. Heinz and Y. R. Shen, Phys. Rev. Lett. 51, 1983 (1983); J. E. Sipe, D. J.
  // Moss and H. M. van Driel, Phys. Rev. B 35, 1129 (1987). With x = [1-10], normal to the (1-10)
  // mirror, the derivation from the 3m form gives I_ss ∝ cos²3φ.
  const crystal = { pointGroup: '-43m', normal: [1, 1, 1], reference: [1, -1, 0] }
  const run = (angleDeg: number, pump: string, analyser: string) =>
    computePolar({ crystal, order: 2, incidence: { angleDeg }, pump, analyser, stepDeg: 5 })

  it('three-fold at oblique incidence in p-p and s-p, six-fold in p-s and s-s', () => {
    expect(run(45, 'p', 'p').harmonics).toEqual([0, 3, 6])
    expect(run(45, 's', 'p').harmonics).toEqual([0, 3, 6])
    expect(run(45, 'p', 's').harmonics).toEqual([0, 6])
    const ss = run(45, 's', 's')
    expect(ss.harmonics).toEqual([0, 6])
    for (const p of ss.points) expect(p.intensity).toBeCloseTo(Math.cos(3 * p.azimuthDeg * deg) ** 2, 12)
  })

  it('six-fold at normal incidence', () => {
    for (const [pump, analyser] of [
      ['p', 'p'],
      ['p', 's'],
      ['s', 'p'],
      ['s', 's'],
    ])
      expect(run(0, pump, analyser).harmonics).toEqual([0, 6])
  })

  it('p-p is |a + b sin 3φ|² with x normal to a mirror: I(30°) ≠ I(90°), and I(φ) = I(φ + 120°)', () => {
    const pp = run(45, 'p', 'p').points
    const at = (d: number) => pp[(d / 5) % 72].intensity
    for (const d of [0, 15, 35]) expect(at(d)).toBeCloseTo(at(d + 120), 12)
    expect(Math.abs(at(30) - at(90))).toBeGreaterThan(0.05)
    expect(at(0)).toBeCloseTo(at(60), 12)
  })
})

describe('3m Z-cut (lithium niobate class, mirror normal to x)', () => {
  // Common practice for a C3v crystal cut normal to its three-fold axis: six-fold patterns at normal
  // incidence (I∥ ∝ sin²3φ, I⊥ ∝ cos²3φ with x normal to a mirror), a three-fold s-p pattern at
  // oblique incidence from the interference of the isotropic zxx element with the three-fold one
  // (derivation in docs/physics.md §6; the same symmetry argument as Tom, Heinz & Shen, PRL 51, 1983 (1983)).
  const crystal = { pointGroup: '3m', normal: [0, 0, 1], reference: [1, 0, 0] }
  it('six-fold at normal incidence, three-fold s-p at 45°', () => {
    const pp0 = computePolar({
      crystal,
      order: 2,
      incidence: { angleDeg: 0 },
      pump: 'p',
      analyser: 'p',
      coefficients: { zxx: 0.2, zzz: 3, xxz: 0.2 },
      stepDeg: 5,
    })
    expect(pp0.harmonics).toEqual([0, 6])
    for (const p of pp0.points) expect(p.intensity).toBeCloseTo(Math.sin(3 * p.azimuthDeg * deg) ** 2, 12)
    expect(
      computePolar({ crystal, order: 2, incidence: { angleDeg: 45 }, pump: 's', analyser: 'p' }).harmonics,
    ).toEqual([0, 3, 6])
  })
})

describe('isotropic interface (class ∞m) alone', () => {
  // An isotropic surface gives a φ-independent p-polarised harmonic and no s-polarised harmonic for
  // a p or s pump; a mixed pump gives s-out through χ_xxz (= χ_yyz): Sipe, Moss & van Driel, Phys.
  // Rev. B 35, 1129 (1987); T. F. Heinz, in Nonlinear Surface Electromagnetic Phenomena (Elsevier,
  // 1991), ch. 5. Reflected p-p field amplitude (derived): s(zzz s² + zxx c² − 2 xxz c²).
  const w = { zzz: 1, zxx: 0.4, xxz: 0.25 }
  const req = (pump: unknown, analyser: unknown, angleDeg = 60) => ({
    surface: true,
    order: 2,
    incidence: { angleDeg },
    pump,
    analyser,
    surfaceCoefficients: w,
    stepDeg: 10,
  })

  it('p-out does not depend on φ; s-out vanishes for p and s pumps; a 45° pump gives s-out', () => {
    expect(computePolar(req('p', 'p')).harmonics).toEqual([0])
    expect(computePolar(req('s', 'p')).harmonics).toEqual([0])
    expect(computePolar(req('p', 's')).harmonics).toEqual([])
    expect(computePolar(req('s', 's')).harmonics).toEqual([])
    const mixed = computePolar(req({ angleDeg: 45 }, 's'))
    expect(mixed.harmonics).toEqual([0])
    expect(mixed.points.every((p) => Math.abs(p.intensity - 1) < 1e-12)).toBe(true)
  })

  it('p-p amplitude equals s(zzz s² + zxx c² − 2 xxz c²)', () => {
    const theta = 60,
      c = Math.cos(theta * deg),
      s = Math.sin(theta * deg)
    const { tensor } = polarSampleTensor(parsePolarRequest(req('p', 'p', theta)))
    const [I] = predictObliquePattern(tensor, geometry(theta, P, P), [17])
    expect(I).toBeCloseTo((s * (w.zzz * s * s + w.zxx * c * c - 2 * w.xxz * c * c)) ** 2, 12)
  })
})

describe('Fresnel factors of a bare interface', () => {
  // Born & Wolf, Principles of Optics, §1.5.2–1.5.3: r_s = (cos θ − n cos θ_t)/(cos θ + n cos θ_t),
  // r_p = (n cos θ − cos θ_t)/(n cos θ + cos θ_t), and for a lossless medium R + T = 1 with
  // T = (n cos θ_t / cos θ)|t|². Stokes relations (Hecht, Optics, §4.10): t t' = 1 − r².
  it('conserve energy and obey the Stokes relations; at normal incidence t = 2/(1 + n)', () => {
    fc.assert(
      fc.property(num(1.01, 4), num(0, 85), (n, theta) => {
        const c = Math.cos(theta * deg)
        const tin = fresnelCrossing([n, 0], theta, 'in')
        const tout = fresnelCrossing([n, 0], theta, 'out')
        const ct = tin.cosInside[0]
        const rs = (c - n * ct) / (c + n * ct)
        const rp = (n * c - ct) / (n * c + ct)
        expect(rs * rs + ((n * ct) / c) * tin.ts[0] ** 2).toBeCloseTo(1, 10)
        expect(rp * rp + ((n * ct) / c) * tin.tp[0] ** 2).toBeCloseTo(1, 10)
        expect(tin.ts[0] * tout.ts[0]).toBeCloseTo(1 - rs * rs, 10)
        expect(tin.tp[0] * tout.tp[0]).toBeCloseTo(1 - rp * rp, 10)
      }),
      { seed: 16, numRuns: 200 },
    )
    const t0 = fresnelCrossing([1.5, 0], 0, 'in')
    expect(t0.ts[0]).toBeCloseTo(0.8, 14)
    expect(t0.tp[0]).toBeCloseTo(0.8, 14)
  })

  it('an absorbing medium gives a wave that decays inward (Im(n cos θ_t) ≥ 0)', () => {
    const { cosInside } = fresnelCrossing([0.2, 3.4], 70, 'in')
    const ncos: Complex = [0.2 * cosInside[0] - 3.4 * cosInside[1], 0.2 * cosInside[1] + 3.4 * cosInside[0]]
    expect(ncos[1]).toBeGreaterThan(0)
  })

  it('(001) zinc blende keeps the sin²2φ form with Fresnel factors; at θ = 0 they change no normalised pattern', () => {
    const crystal = { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] }
    const fresnel = { n: [3.68, 0.09], n2: [4.2, 1.6] }
    const pp = computePolar({
      crystal,
      order: 2,
      incidence: { angleDeg: 50 },
      pump: 'p',
      analyser: 'p',
      fresnel,
      stepDeg: 5,
    })
    for (const p of pp.points) expect(p.intensity).toBeCloseTo(Math.sin(2 * p.azimuthDeg * deg) ** 2, 10)
    const tri = { pointGroup: '3m', normal: [0, 0, 1], reference: [1, 0, 0] }
    for (const [pump, analyser] of [
      ['p', 'p'],
      ['s', 'p'],
      ['p', 's'],
    ]) {
      const a = computePolar({ crystal: tri, order: 2, incidence: { angleDeg: 0 }, pump, analyser, stepDeg: 7 })
      const b = computePolar({
        crystal: tri,
        order: 2,
        incidence: { angleDeg: 0 },
        pump,
        analyser,
        stepDeg: 7,
        fresnel,
      })
      a.points.forEach((p, i) => expect(b.points[i].intensity).toBeCloseTo(p.intensity, 12))
    }
  })

  it('the s-pump field inside is t_s and the p field follows the refracted direction', () => {
    const f = obliqueFields({
      angleDeg: 45,
      detect: 'reflection',
      pumpDeg: 90,
      analyserDeg: 0,
      fresnel: { n: [1.5, 0], n2: [1.5, 0] },
    })
    const c = Math.cos(45 * deg),
      ct = Math.sqrt(1 - 0.5 / 2.25)
    expect(f.pump[1][0]).toBeCloseTo((2 * c) / (c + 1.5 * ct), 14)
    expect(f.pump[0][0]).toBeCloseTo(0, 14)
    // The reflected p analyser points along (−cos θ₂, 0, sin θ₂) inside, times t_p(out).
    expect(f.detector[0][0]).toBeLessThan(0)
    expect(f.detector[0][0] / f.detector[2][0]).toBeCloseTo(-ct / (Math.sin(45 * deg) / 1.5), 12)
  })
})

// Seeded properties over random noncentrosymmetric classes, cuts and geometries.
const GROUPS = ['-43m', '3m', '4mm', 'mm2', '32', '6mm', '-6m2', '222', '-42m', '3', '23']
const cut = fc.constantFrom<[number, number, number][]>(
  [
    [0, 0, 1],
    [1, 0, 0],
  ],
  [
    [1, 1, 1],
    [1, -1, 0],
  ],
  [
    [1, 1, 0],
    [0, 0, 1],
  ],
  [
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [1, 0, 0],
    [0, 1, 0],
  ],
  [
    [2, 1, 3],
    [1, -2, 0],
  ],
)
const weightsFor = (group: string, order: number, raw: number[]) => {
  const form = solveTensorForm(group, order)
  return Object.fromEntries(form.pivots.map((p, i) => [form.space.labels[p], raw[i % raw.length]]))
}

describe('properties (seeded)', () => {
  it('turning the crystal by α shifts the pattern by α: I_α(φ) = I_0(φ − α)', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...GROUPS),
        cut,
        num(-180, 180),
        num(0, 80),
        num(0, 180),
        num(0, 180),
        num(0, 360),
        fc.array(num(-2, 2), { minLength: 4, maxLength: 4 }),
        (group, [normal, reference], alpha, theta, pump, analyser, phi, raw) => {
          const g = geometry(theta, pump, analyser)
          const w = weightsFor(group, 2, raw)
          const tensorAt = (azimuth: number) =>
            polarSampleTensor(
              parsePolarRequest({
                crystal: { pointGroup: group, normal, reference, azimuth },
                order: 2,
                incidence: { angleDeg: theta },
                coefficients: w,
              }),
            ).tensor
          const [a] = predictObliquePattern(tensorAt(alpha), g, [phi])
          const [b] = predictObliquePattern(tensorAt(0), g, [phi - alpha])
          expect(a).toBeCloseTo(b, 10)
        },
      ),
      { seed: 161, numRuns: 150 },
    )
  })

  it('at θ = 0 p-p and p-s equal the normal-incidence parallel and perpendicular patterns at −φ', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...GROUPS),
        cut,
        fc.array(num(-2, 2), { minLength: 4, maxLength: 4 }),
        num(0, 360),
        (group, [normal, reference], raw, phi) => {
          const { tensor } = polarSampleTensor(
            parsePolarRequest({
              crystal: { pointGroup: group, normal, reference },
              order: 2,
              incidence: { angleDeg: 0 },
              coefficients: weightsFor(group, 2, raw),
            }),
          )
          const [ref] = predictPolarPattern(tensor, [-phi])
          expect(predictObliquePattern(tensor, geometry(0, P, P), [phi])[0]).toBeCloseTo(ref.parallel, 10)
          expect(predictObliquePattern(tensor, geometry(0, P, S), [phi])[0]).toBeCloseTo(ref.perpendicular, 10)
        },
      ),
      { seed: 162, numRuns: 150 },
    )
  })

  it("the Fourier orders of I(φ) are differences q − q′ of the cut's cylindrical content Q (its allowed rotational period)", () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...GROUPS),
        cut,
        fc.constantFrom(2, 3),
        num(0, 80),
        num(0, 180),
        num(0, 180),
        fc.boolean(),
        (group, [normal, reference], order, theta, pump, analyser, transmission) => {
          const q = prepareSampleTensor({ pointGroup: group, normal, reference, order }).content.q
          const allowed = new Set(q.flatMap((a) => q.map((b) => Math.abs(a - b))))
          const r = computePolar({
            crystal: { pointGroup: group, normal, reference },
            order,
            stepDeg: 30,
            incidence: { angleDeg: theta, detect: transmission ? 'transmission' : 'reflection' },
            pump: { angleDeg: pump },
            analyser: { angleDeg: analyser },
          })
          for (const k of r.harmonics) expect(allowed.has(k)).toBe(true)
        },
      ),
      { seed: 163, numRuns: 120 },
    )
  })

  it('an equivalent description of the same cut gives the same pattern ((111) with x = [1-10] or [01-1], related by the three-fold axis)', () => {
    fc.assert(
      fc.property(num(0, 80), num(0, 180), num(0, 180), fc.boolean(), (theta, pump, analyser, surface) => {
        const base = {
          order: 2,
          surface,
          incidence: { angleDeg: theta },
          pump: { angleDeg: pump },
          analyser: { angleDeg: analyser },
          stepDeg: 10,
        }
        const a = computePolar({ ...base, crystal: { pointGroup: '-43m', normal: [1, 1, 1], reference: [1, -1, 0] } })
        const b = computePolar({ ...base, crystal: { pointGroup: '-43m', normal: [1, 1, 1], reference: [0, 1, -1] } })
        expect(b.harmonics).toEqual(a.harmonics)
        a.points.forEach((p, i) => expect(b.points[i].intensity).toBeCloseTo(p.intensity, 10))
      }),
      { seed: 164, numRuns: 60 },
    )
  })
})

describe('request validation', () => {
  const crystal = { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] }
  const fieldOf = (req: unknown) => {
    try {
      computePolar(req)
    } catch (e) {
      if (e instanceof EngineError) return e.field
      throw e
    }
    return undefined
  }
  it('names the bad field', () => {
    expect(fieldOf({ order: 2, incidence: { angleDeg: 45 } })).toBe('crystal')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 90 } })).toBe('incidence.angleDeg')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45, detect: 'sideways' } })).toBe('incidence.detect')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, pump: 'q' })).toBe('pump')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, analyser: { angleDeg: 'x' } })).toBe(
      'analyser.angleDeg',
    )
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, stepDeg: 0 })).toBe('stepDeg')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, fresnel: { n: [-1, 0] } })).toBe('fresnel.n')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, fresnel: true })).toBe('fresnel')
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, coefficients: { xxx: 1 } })).toBe(
      'coefficients.xxx',
    )
    expect(fieldOf({ crystal, order: 2, incidence: { angleDeg: 45 }, surfaceCoefficients: { zzz: 1 } })).toBe(
      'surfaceCoefficients',
    )
    expect(fieldOf({ crystal, order: 7, incidence: { angleDeg: 45 } })).toBe('order')
    expect(fieldOf({ crystal: { ...crystal, reference: [0, 0, 2] }, order: 2, incidence: { angleDeg: 45 } })).toBe(
      'crystal.reference',
    )
    expect(fieldOf({ crystal: null, surface: true, order: 2, incidence: { angleDeg: 45 } })).toBeUndefined()
  })

  it('rejects a tensor that is not χ(N)', () => {
    expect(() => predictObliquePattern(new Float64Array(10), geometry(45, P, P), [0])).toThrow(/rank 3 to 6/)
  })
})
