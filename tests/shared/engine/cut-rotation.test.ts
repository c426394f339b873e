import { describe, it, expect } from 'vitest'
import {
  labFrame,
  rotateToSample,
  solveTensorForm,
  toVoigt,
  EngineError,
  parseDirection,
  computeChannels,
} from '../../../shared/engine'
import { det3, norm, unitVector } from '../../../shared/engine/linalg'

describe('cut rotation', () => {
  // SHAARP, npj Comput. Mater. 8, 246 (2022), supplementary note 5: zinc-blende d rotated to (111)
  // with lab x ∥ [1−10], z ∥ [111] (y = z × x ∥ [11−2]), in units of d14. Our d14 = +1 in the
  // crystal frame reproduces the published signs exactly (no global sign flip needed).
  it('zinc-blende (111), x ∥ [1−10]: d33 = 2/√3, d31 = d32 = d15 = d24 = −1/√3, d16 = d21 = −d22 = √(2/3) (SHAARP 2022, suppl. note 5)', () => {
    const [t] = solveTensorForm('-43m', 2).tensors
    const d = toVoigt(rotateToSample(t, 3, labFrame({ normal: [1, 1, 1], reference: [1, -1, 0] })))
    const s3 = Math.sqrt(3)
    expect(d[2][2]).toBeCloseTo(2 / s3, 12)
    for (const v of [d[2][0], d[2][1], d[0][4], d[1][3]]) expect(v).toBeCloseTo(-1 / s3, 12)
    for (const v of [d[0][5], d[1][0], -d[1][1]]) expect(v).toBeCloseTo(Math.sqrt(2 / 3), 12)
    for (const v of [d[0][0], d[0][1], d[0][2], d[0][3], d[1][2], d[1][4], d[2][3], d[2][4], d[2][5]])
      expect(v).toBeCloseTo(0, 12)
  })

  it('lab frame is right-handed and orthonormal, z along the normal, x along the projected reference', () => {
    const f = labFrame({ normal: [1, 1, 1], reference: [1, 0, 0], azimuthDeg: 17 })
    expect(det3(f)).toBeCloseTo(1, 12)
    expect([f[6], f[7], f[8]].map((v) => v * Math.sqrt(3))).toEqual([1, 1, 1].map((v) => expect.closeTo(v, 12)))
  })

  it('azimuth rotates x counter-clockwise about z', () => {
    const f = labFrame({ normal: [0, 0, 1], reference: [1, 0, 0], azimuthDeg: 90 })
    expect(f.slice(0, 3).map((v) => Math.round(v * 1e12) / 1e12)).toEqual([0, 1, 0])
  })

  it('zero normal → ZERO_VECTOR at crystal.normal', () => {
    expect(() => labFrame({ normal: [0, 0, 0], reference: [1, 0, 0] })).toThrow(
      expect.objectContaining({ code: 'ZERO_VECTOR', field: 'crystal.normal' }),
    )
  })

  it('reference parallel to the normal → REFERENCE_PARALLEL_TO_NORMAL with a readable message', () => {
    try {
      labFrame({ normal: [0, 0, 1], reference: [0, 0, -3] })
      expect.unreachable()
    } catch (e) {
      expect(e).toBeInstanceOf(EngineError)
      expect((e as EngineError).code).toBe('REFERENCE_PARALLEL_TO_NORMAL')
      expect((e as EngineError).message).toMatch(
        /^crystal\.reference: the reference \[0,0,-3\] is parallel to the normal/,
      )
    }
  })

  it('directions: axis names, Miller notation (cubic only)', () => {
    expect(parseDirection('Z', 'n', false)).toEqual([0, 0, 1])
    expect(parseDirection('X-cut', 'n', false)).toEqual([1, 0, 0])
    expect(parseDirection('[1-10]', 'n', true)).toEqual([1, -1, 0])
    expect(parseDirection('(111)', 'n', true)).toEqual([1, 1, 1])
    expect(() => parseDirection('(001)', 'crystal.normal', false)).toThrow(/only accepted for cubic/)
    expect(() => parseDirection([1, 2], 'crystal.normal', true)).toThrow(
      expect.objectContaining({ code: 'INVALID_DIRECTION' }),
    )
  })
})

// A direction has no magnitude: [0, 0, 1e200] and [0, 0, 1e-200] are the z axis. Their squared
// norms overflow to ∞ or underflow to 0, so the length is taken after scaling by the largest
// component (the scaled 2-norm of LAPACK's dnrm2: Anderson et al., LAPACK Users' Guide, 3rd ed., 1999).
describe('huge and tiny direction vectors', () => {
  it('norm and unitVector survive 1e±200', () => {
    expect(norm([1e200, 1e200, 0])).toBeCloseTo(Math.SQRT2 * 1e200, -186)
    expect(norm([3e-200, 4e-200, 0]) / 1e-200).toBeCloseTo(5, 12)
    expect(unitVector([0, 0, 1e-200])).toEqual([0, 0, 1])
    expect(unitVector([1e300, 1e300, 0])[0]).toBeCloseTo(Math.SQRT1_2, 15)
  })

  it('a cut given with huge or tiny vectors has the same lab frame and the same channels', () => {
    const frame = labFrame({ normal: [0, 0, 1], reference: [1, 0, 0] })
    for (const s of [1e200, 1e-200, 1e-310]) {
      const f = labFrame({ normal: [0, 0, s], reference: [s, 0, 0] })
      f.forEach((v, i) => expect(v).toBeCloseTo(frame[i], 14))
      const r = computeChannels({
        crystal: { pointGroup: '-43m', normal: [0, 0, s], reference: [s, 0, s * 1e-3] },
        structure: { rotationOrder: 0, mirrors: [0] },
        pump: { type: 'circular', m: 1 },
        order: 2,
      })
      expect(r.q).toEqual([-2, 2])
      expect(r.m).toEqual([0, 4])
    }
  })

  it('only the exact zero vector is zero; a reference parallel to the normal is judged relative to its length', () => {
    expect(() => labFrame({ normal: [0, 0, 0], reference: [1, 0, 0] })).toThrow(
      expect.objectContaining({ code: 'ZERO_VECTOR' }),
    )
    expect(() => parseDirection([0, 0, 0], 'crystal.normal', true)).toThrow(
      expect.objectContaining({ code: 'ZERO_VECTOR' }),
    )
    expect(parseDirection([0, 0, 1e-200], 'crystal.normal', true)).toEqual([0, 0, 1e-200])
    expect(() => labFrame({ normal: [0, 0, 1e200], reference: [1e180, 0, 1e200] })).toThrow(
      expect.objectContaining({ code: 'REFERENCE_PARALLEL_TO_NORMAL' }),
    )
    expect(() => labFrame({ normal: [0, 0, 1e-200], reference: [1e-200, 0, 1e-200] })).not.toThrow()
  })
})
