import { describe, it, expect } from 'vitest'
import fc from 'fast-check'
import { prepareSampleTensor, POINT_GROUP_SYMBOLS, computeCylindricalContent } from '../../../shared/engine'

const Q = (
  pointGroup: string,
  normal: [number, number, number],
  reference: [number, number, number],
  order = 2,
  surface = false,
) => prepareSampleTensor({ pointGroup, normal, reference, order, surface }).content.q

describe('cylindrical content Q', () => {
  it('zinc-blende (001): Q = {±2} (common practice)', () => {
    expect(Q('-43m', [0, 0, 1], [1, 0, 0])).toEqual([-2, 2])
  })

  it('zinc-blende (111): Q = {0, ±3} (common practice)', () => {
    expect(Q('-43m', [1, 1, 1], [1, -1, 0])).toEqual([-3, 0, 3])
  })

  it('isotropic interface χ(2): Q = {0} (docs/physics.md §3 rule 2)', () => {
    expect(Q('m-3m', [0, 0, 1], [1, 0, 0], 2, true)).toEqual([0])
  })

  it('centrosymmetric bulk: χ(2) vanishes, Q is empty', () => {
    expect(Q('m-3m', [1, 1, 0], [0, 0, 1])).toEqual([])
  })

  it('a tensor with a single Fourier order: 3m Z-cut has Q ⊆ {0, ±3}, weights sum to 1', () => {
    const c = prepareSampleTensor({ pointGroup: '3m', normal: [0, 0, 1], reference: [1, 0, 0], order: 2 }).content
    expect(c.q).toEqual([-3, 0, 3])
    expect(c.weights.reduce((a, w) => a + w.weight, 0)).toBeCloseTo(1, 12)
  })

  it('the check can fail: a generic triclinic tensor carries every |q| ≤ 3', () => {
    expect(computeCylindricalContent([new Float64Array(27).map((_, i) => Math.cos(3 * i + 1))], 3).q).toEqual([
      -3, -2, -1, 0, 1, 2, 3,
    ])
  })

  it('property (seeded): Q and its weights are symmetric and do not depend on the in-plane azimuth', () => {
    const dir = fc.tuple(
      fc.integer({ min: -3, max: 3 }),
      fc.integer({ min: -3, max: 3 }),
      fc.integer({ min: -3, max: 3 }),
    )
    fc.assert(
      fc.property(
        fc.constantFrom(...POINT_GROUP_SYMBOLS),
        dir,
        fc.double({ min: -180, max: 180, noNaN: true }),
        fc.integer({ min: 2, max: 3 }),
        (pg, normal, az, order) => {
          if (normal.every((v) => v === 0)) return
          const reference: [number, number, number] =
            Math.abs(normal[0]) + Math.abs(normal[1]) === 0 ? [1, 0, 0] : [-normal[1], normal[0], 0]
          const a = prepareSampleTensor({ pointGroup: pg, normal, reference, order }).content
          const b = prepareSampleTensor({ pointGroup: pg, normal, reference, order, azimuthDeg: az }).content
          expect(b.q).toEqual(a.q)
          expect(a.q).toEqual([...a.q].map((q) => 0 - q).reverse())
          a.weights.forEach((w, i) => {
            expect(b.weights[i].weight).toBeCloseTo(w.weight, 9)
            expect(a.weights[a.weights.length - 1 - i].weight).toBeCloseTo(w.weight, 9)
          })
        },
      ),
      { seed: 42, numRuns: 120 },
    )
  })
})
