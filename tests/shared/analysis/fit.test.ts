import { describe, it, expect } from 'vitest'
import type { PatternModel, PolarSweep } from '../../../shared/analysis'
import { fitPolarSweep, AnalysisError } from '../../../shared/analysis'
import { seededNormal, sweepAngles } from './seeded'

const rad = (d: number) => (d * Math.PI) / 180
const wrap = (d: number, period: number) => (((d % period) + period + period / 2) % period) - period / 2

function synthetic(
  angles: number[],
  channels: { analyser: 'parallel' | 'perpendicular'; law: (th: number) => number }[],
  seed: number,
  noise = 0.03,
): PolarSweep {
  const gauss = seededNormal(seed)
  return {
    anglesDeg: angles,
    angleColumn: 'angle',
    angleUnit: 'deg',
    angleUnitReason: 'test',
    skipped: [],
    notes: [],
    channels: channels.map((c) => {
      const clean = angles.map((a) => c.law(rad(a)))
      const peak = Math.max(...clean)
      return { column: c.analyser, analyser: c.analyser, intensity: clean.map((v) => v + noise * peak * gauss()) }
    }),
  }
}

// Data generated from the published D3h law (Li et al., Nano Lett. 13, 3329 (2013)):
// I_par = A cos²(3(θ − φ)) + B, I_perp = A sin²(3(θ − φ)) + B, θ from the chip edge, φ = armchair azimuth.
describe('fit recovers the crystal azimuth of a D3h monolayer (law of Li et al., Nano Lett. 13, 3329 (2013))', () => {
  const model: PatternModel = { pointGroup: '-6m2', normal: [0, 0, 1], reference: [0, 1, 0], order: 2 }
  const truePhi = 17.3
  const sweep = synthetic(
    sweepAngles(2),
    [
      { analyser: 'parallel', law: (t) => 1000 * Math.cos(3 * (t - rad(truePhi))) ** 2 + 40 },
      { analyser: 'perpendicular', law: (t) => 1000 * Math.sin(3 * (t - rad(truePhi))) ** 2 + 40 },
    ],
    20130612,
  )
  const fit = fitPolarSweep(sweep, model)

  it('azimuth within 3σ of the truth, σ < 1°, modulo the 60° period', () => {
    expect(fit.azimuthPeriodDeg).toBeCloseTo(60, 9)
    expect(fit.azimuth.sigma).toBeGreaterThan(0)
    expect(fit.azimuth.sigma).toBeLessThan(1)
    expect(Math.abs(wrap(fit.azimuth.value - truePhi, 60))).toBeLessThan(3 * fit.azimuth.sigma)
  })

  it('scale and background close to the generating values, good R², six-fold symmetry matched', () => {
    // Model intensity = s·(d22 amplitude)²: with the unit basis the parallel maximum equals s.
    expect(Math.abs(fit.scale.value - 1000)).toBeLessThan(3 * fit.scale.sigma)
    for (const b of fit.backgrounds) expect(Math.abs(b.value - 40)).toBeLessThan(3 * b.sigma + 1e-9)
    expect(fit.rSquared).toBeGreaterThan(0.98)
    expect(fit.symmetry.map((s) => [s.dataFold, s.modelFold])).toEqual([
      [6, 6],
      [6, 6],
    ])
    expect(fit.isSymmetryMatch).toBe(true)
    expect(fit.residuals).toHaveLength(2 * 180)
    expect(fit.assumptions.length).toBeGreaterThan(0)
  })

  it('can fail: four-fold data are flagged as not matching the D3h model', () => {
    const fourFold = synthetic(
      sweepAngles(2),
      [{ analyser: 'parallel', law: (t) => 500 * Math.sin(2 * t) ** 2 + 10 }],
      7,
    )
    const bad = fitPolarSweep(fourFold, model)
    expect(bad.symmetry[0].dataFold).toBe(4)
    expect(bad.isSymmetryMatch).toBe(false)
    expect(bad.rSquared).toBeLessThan(0.5)
  })
})

// Wurtzite (6mm) a-plane, lab x ∥ c, z ∥ crystal x (so lab y = −crystal y). Derived here from the
// 6mm d-matrix (Boyd, Nonlinear Optics, §1.5: d15 = d24, d31 = d32, d33):
// P·e_θ = cos θ [(2d15 + d31) sin²θ + d33 cos²θ],  P·e_θ+90° = sin θ [(2d15 − d33) cos²θ − d31 sin²θ].
describe('fit recovers azimuth and tensor ratios of an a-plane wurtzite film (closed form derived from the 6mm d-matrix)', () => {
  const model: PatternModel = { pointGroup: '6mm', normal: [1, 0, 0], reference: [0, 0, 1], order: 2 }
  const [d15, d31, d33, phi] = [1, -0.5, 2, 17.3]
  const par = (t: number) => Math.cos(t) * ((2 * d15 + d31) * Math.sin(t) ** 2 + d33 * Math.cos(t) ** 2)
  const perp = (t: number) => Math.sin(t) * ((2 * d15 - d33) * Math.cos(t) ** 2 - d31 * Math.sin(t) ** 2)
  const sweep = synthetic(
    sweepAngles(1),
    [
      { analyser: 'parallel', law: (t) => 300 * par(t - rad(phi)) ** 2 + 20 },
      { analyser: 'perpendicular', law: (t) => 300 * perp(t - rad(phi)) ** 2 + 20 },
    ],
    42,
  )
  const fit = fitPolarSweep(sweep, model)

  it('azimuth (modulo 180°) and the ratios d31/d15, d33/d15 within 3σ', () => {
    expect(fit.azimuthPeriodDeg).toBeCloseTo(180, 9)
    expect(fit.azimuth.sigma).toBeLessThan(1)
    expect(Math.abs(wrap(fit.azimuth.value - phi, 180))).toBeLessThan(3 * fit.azimuth.sigma)
    const [r15, r31, r33] = fit.ratios
    expect(r15).toMatchObject({ label: 'd15', value: 1, role: 'reference' })
    expect(r31.label).toBe('d31')
    expect(Math.abs(r31.value! - d31 / d15)).toBeLessThan(3 * r31.sigma)
    expect(Math.abs(r33.value! - d33 / d15)).toBeLessThan(3 * r33.sigma)
    expect(fit.rSquared).toBeGreaterThan(0.95)
  })
})

describe('fit inputs the model cannot describe', () => {
  it('(001) zinc blende has no in-plane field at normal incidence: clear NOTHING_TO_FIT', () => {
    const sweep = synthetic(sweepAngles(5), [{ analyser: 'parallel', law: (t) => Math.sin(2 * t) ** 2 }], 1)
    const model: PatternModel = { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0], order: 2 }
    expect(() => fitPolarSweep(sweep, model)).toThrow(AnalysisError)
    expect(() => fitPolarSweep(sweep, model)).toThrow(/no in-plane harmonic field at normal incidence/)
  })

  it('a Z-cut 3m crystal: only the d22 family is observable, the rest is reported as such', () => {
    const sweep = synthetic(sweepAngles(3), [{ analyser: 'parallel', law: (t) => Math.sin(3 * (t - rad(10))) ** 2 }], 3)
    const fit = fitPolarSweep(sweep, { pointGroup: '3m', normal: [0, 0, 1], reference: [1, 0, 0], order: 2 })
    expect(fit.ratios.map((r) => r.role)).toEqual(['not-observable', 'reference', 'not-observable', 'not-observable'])
    expect(fit.notes.join(' ')).toMatch(/not observable.*d15, d31, d33/)
  })
})
