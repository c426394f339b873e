import { describe, it, expect } from 'vitest'
import {
  solveTensorForm,
  describeDMatrixEqualities,
  formDMatrix,
  toVoigt,
  rotateToSample,
  countNonZeroVoigt,
  getPointGroup,
} from '../../../shared/engine'
import { rotationAboutAxis } from '../../../shared/engine/linalg'

// d-matrix forms as printed in handbooks (Boyd, Nonlinear Optics, §1.5 table of d-matrix forms;
// Nye for the piezoelectric analogues), standard IEEE Std 176 settings.
describe('d-matrix equalities (handbook forms)', () => {
  it('-43m: d14 = d25 = d36 (Boyd §1.5)', () => {
    expect(describeDMatrixEqualities(solveTensorForm('-43m', 2))).toEqual(['d14 = d25 = d36'])
  })

  it('3m: d15 = d24, d16 = d21 = −d22, d31 = d32, d33 (Boyd §1.5; LiNbO3 has d22, not d11)', () => {
    expect(describeDMatrixEqualities(solveTensorForm('3m', 2))).toEqual([
      'd15 = d24',
      'd16 = d21 = −d22',
      'd31 = d32',
      'd33',
    ])
    const d = formDMatrix(solveTensorForm('3m', 2))
    expect(d[0][0]).toHaveLength(0) // d11 = 0 in the standard setting
  })

  it('-6m2: the d22 family only, d22 = −d21 = −d16 (Boyd §1.5, mirror ⟂ x)', () => {
    expect(describeDMatrixEqualities(solveTensorForm('-6m2', 2))).toEqual(['d16 = d21 = −d22'])
  })

  it('6mm and 4mm: d15 = d24, d31 = d32, d33 (Boyd §1.5)', () => {
    expect(describeDMatrixEqualities(solveTensorForm('6mm', 2))).toEqual(['d15 = d24', 'd31 = d32', 'd33'])
    expect(describeDMatrixEqualities(solveTensorForm('4mm', 2))).toEqual(['d15 = d24', 'd31 = d32', 'd33'])
  })

  it('-42m (diad ∥ x): d14 = d25, d36 (Boyd §1.5)', () => {
    expect(describeDMatrixEqualities(solveTensorForm('-42m', 2))).toEqual(['d14 = d25', 'd36'])
  })

  it('trap: SHG d-matrix has no factor 2 where piezoelectric tables have d16 = −2 d22 (Nye; IEEE Std 176-1987; docs/physics.md §4)', () => {
    const t = solveTensorForm('3m', 2).tensors
    const withD22 = t.find((x) => toVoigt(x)[1][1] !== 0)!
    const d = toVoigt(withD22)
    expect(d[0][5] / d[1][1]).toBe(-1)
    expect(d[1][0] / d[1][1]).toBe(-1)
  })

  it('trap: x along the armchair direction relabels the -6m2 family as d11 = −d12 = −d26 (Nye; IEEE Std 176-1987; docs/physics.md §4)', () => {
    const [t] = solveTensorForm('-6m2', 2).tensors
    const d = toVoigt(rotateToSample(t, 3, rotationAboutAxis([0, 0, 1], -Math.PI / 2)))
    expect(d[1][1]).toBeCloseTo(0, 12)
    expect(d[0][1]).toBeCloseTo(-d[0][0], 12)
    expect(d[1][5]).toBeCloseTo(-d[0][0], 12)
    expect(Math.abs(d[0][0])).toBeCloseTo(1, 12)
  })

  it('-62m is its own setting of D3h (diad ∥ x, mirror ⟂ y): d11 = −d12 = −d26, the -6m2 form turned by 90° (International Tables for Crystallography Vol. A, the −6m2 and −62m orientations)', () => {
    const g = getPointGroup('-62m')
    expect(g.symbol).toBe('-62m')
    expect(g.schoenflies).toBe('D3h')
    expect(g.order).toBe(12)
    expect(g.setting).toMatch(/diad ∥ x, mirror ⟂ y/)
    expect(getPointGroup('-6m2').setting).toMatch(/mirror ⟂ x/)
    expect(describeDMatrixEqualities(solveTensorForm('-62m', 2))).toEqual(['d11 = −d12 = −d26'])
    // The same tensor as -6m2 seen with x along its old y axis (up to the sign of the one parameter).
    const turned = toVoigt(
      rotateToSample(solveTensorForm('-6m2', 2).tensors[0], 3, rotationAboutAxis([0, 0, 1], -Math.PI / 2)),
    )
    const own = toVoigt(solveTensorForm('-62m', 2).tensors[0])
    const sign = Math.sign(turned[0][0] / own[0][0])
    own.forEach((row, i) => row.forEach((v, l) => expect(sign * v).toBeCloseTo(turned[i][l], 12)))
  })

  it('counts non-zero d-matrix entries: -43m 3, 3m 8', () => {
    expect(countNonZeroVoigt(solveTensorForm('-43m', 2))).toBe(3)
    expect(countNonZeroVoigt(solveTensorForm('3m', 2))).toBe(8)
  })
})
