import { describe, it, expect } from 'vitest'
import { prepareSampleTensor, sampleParity, computeMirrorParity } from '../../../shared/engine'

const parity = (normal: [number, number, number], reference: [number, number, number], psi: number) =>
  sampleParity(prepareSampleTensor({ pointGroup: '-43m', normal, reference, order: 2 }), psi)

describe('mirror parity of the rotated tensor (common practice; docs/physics.md §4)', () => {
  it('(001) with x ∥ [100]: odd under both axis mirrors', () => {
    expect(parity([0, 0, 1], [1, 0, 0], 0)).toBe(-1)
    expect(parity([0, 0, 1], [1, 0, 0], 90)).toBe(-1)
  })

  it('(001) with x ∥ [110]: even under both axis mirrors (they are the {110} crystal mirrors)', () => {
    expect(parity([0, 0, 1], [1, 1, 0], 0)).toBe(1)
    expect(parity([0, 0, 1], [1, 1, 0], 90)).toBe(1)
  })

  it('(111), x ∥ [1−10]: the mirror with normal [11−2] (ψ = 0) is not a crystal mirror → no parity', () => {
    expect(parity([1, 1, 1], [1, -1, 0], 0)).toBe(0)
    expect(parity([1, 1, 1], [1, -1, 0], 90)).toBe(1)
  })

  it('a mirror at a generic azimuth has no parity; the empty subspace has none either', () => {
    expect(parity([0, 0, 1], [1, 0, 0], 22.5)).toBe(0)
    expect(computeMirrorParity([], 3, 0)).toBe(0)
  })

  it('a subspace with one even and one odd member has no definite parity', () => {
    const even = new Float64Array(27)
    even[0] = 1 // xxx: even under the xz mirror (ψ = 0)
    const odd = new Float64Array(27)
    odd[1] = 1 // xxy: odd under it
    expect(computeMirrorParity([even], 3, 0)).toBe(1)
    expect(computeMirrorParity([odd], 3, 0)).toBe(-1)
    expect(computeMirrorParity([even, odd], 3, 0)).toBe(0)
  })
})
