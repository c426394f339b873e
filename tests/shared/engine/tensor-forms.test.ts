import { describe, it, expect } from 'vitest'
import fc from 'fast-check'
import {
  POINT_GROUP_SYMBOLS,
  getPointGroup,
  solveTensorForm,
  transformTensor,
  flatIndex,
  EngineError,
} from '../../../shared/engine'

// Independent χ(2) components with intrinsic permutation symmetry = independent piezoelectric
// moduli (Nye, Physical Properties of Crystals, ch. VII; IEEE Std 176-1987); centrosymmetric 0.
const CHI2_COUNTS: Record<string, number> = {
  '1': 18,
  '2': 8,
  m: 10,
  '222': 3,
  mm2: 5,
  '4': 4,
  '-4': 4,
  '422': 1,
  '4mm': 3,
  '-42m': 2,
  '3': 6,
  '32': 2,
  '3m': 4,
  '6': 4,
  '-6': 2,
  '622': 1,
  '6mm': 3,
  '-6m2': 1,
  '23': 1,
  '-43m': 1,
  '432': 0,
  '-1': 0,
  '2/m': 0,
  mmm: 0,
  '4/m': 0,
  '4/mmm': 0,
  '-3': 0,
  '-3m': 0,
  '6/m': 0,
  '6/mmm': 0,
  'm-3': 0,
  'm-3m': 0,
}

// χ(3) without any permutation symmetry: [non-zero elements, independent elements].
// Cubic rows: Boyd, Nonlinear Optics, §1.5. Other rows: Boyd §1.5 table,
// reproduced from memory.
const CHI3_GENERAL: Record<string, [number, number]> = {
  '432': [21, 4],
  '-43m': [21, 4],
  'm-3m': [21, 4],
  '23': [21, 7],
  'm-3': [21, 7],
  '1': [81, 81],
  '-1': [81, 81],
  '2': [41, 41],
  m: [41, 41],
  '2/m': [41, 41],
  '222': [21, 21],
  mm2: [21, 21],
  mmm: [21, 21],
  '4': [41, 21],
  '-4': [41, 21],
  '4/m': [41, 21],
  '422': [21, 11],
  '4mm': [21, 11],
  '-42m': [21, 11],
  '4/mmm': [21, 11],
  '3': [73, 27],
  '-3': [73, 27],
  '32': [37, 14],
  '3m': [37, 14],
  '-3m': [37, 14],
  '6': [41, 19],
  '-6': [41, 19],
  '6/m': [41, 19],
  '622': [21, 10],
  '6mm': [21, 10],
  '-6m2': [21, 10],
  '6/mmm': [21, 10],
}

function isInvariant(t: Float64Array, rank: number, symbol: string): boolean {
  return getPointGroup(symbol).elements.every((g) => {
    const r = transformTensor(t, rank, g)
    return r.every((v, i) => Math.abs(v - t[i]) < 1e-9)
  })
}

describe('χ(2) forms: independent components (Nye; IEEE Std 176-1987)', () => {
  it.each(Object.entries(CHI2_COUNTS))('class %s has %i', (symbol, count) => {
    expect(solveTensorForm(symbol, 2).independentCount).toBe(count)
  })

  it('with Kleinman symmetry 422 and 622 vanish (Boyd, Nonlinear Optics, §1.5)', () => {
    expect(solveTensorForm('422', 2, { symmetry: 'kleinman' }).independentCount).toBe(0)
    expect(solveTensorForm('622', 2, { symmetry: 'kleinman' }).independentCount).toBe(0)
    expect(solveTensorForm('-43m', 2, { symmetry: 'kleinman' }).independentCount).toBe(1)
  })
})

describe('χ(3) forms, general tensor (Boyd §1.5)', () => {
  it.each(Object.entries(CHI3_GENERAL))('class %s: %j (non-zero, independent)', (symbol, [nonZero, independent]) => {
    const f = solveTensorForm(symbol, 3, { symmetry: 'none' })
    expect([f.nonZeroCount, f.independentCount]).toEqual([nonZero, independent])
  })

  it('isotropic medium: xxxx = xxyy + xyxy + xyyx (Boyd §1.5, eq. for isotropic χ(3))', () => {
    const f = solveTensorForm('∞∞m', 3, { symmetry: 'none' })
    expect(f.independentCount).toBe(3)
    for (const t of f.tensors) {
      const c = (s: string) => t[flatIndex(s)]
      expect(c('xxxx')).toBeCloseTo(c('xxyy') + c('xyxy') + c('xyyx'), 12)
      expect(c('zzzz')).toBeCloseTo(c('xxxx'), 12)
    }
  })

  it('intrinsic permutation symmetry merges xxyy, xyxy, xyyx: cubic 432 keeps 2', () => {
    expect(solveTensorForm('432', 3).independentCount).toBe(2)
  })
})

describe('solved forms are invariant (property, seeded)', () => {
  it('every element of every group leaves a random member of the solved subspace unchanged', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...POINT_GROUP_SYMBOLS),
        fc.integer({ min: 2, max: 4 }),
        fc.constantFrom('intrinsic', 'kleinman', 'none' as const),
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 81, maxLength: 81 }),
        (symbol, order, symmetry, coeffs) => {
          if (symmetry === 'none' && order > 3) return
          const f = solveTensorForm(symbol, order, { symmetry })
          const t = new Float64Array(3 ** f.rank)
          f.tensors.forEach((b, i) => b.forEach((v, j) => (t[j] += coeffs[i % coeffs.length] * v)))
          expect(isInvariant(t, f.rank, symbol)).toBe(true)
        },
      ),
      { seed: 42, numRuns: 150 },
    )
  })

  it('the invariance check can fail: a generic tensor is not invariant under -43m', () => {
    const t = new Float64Array(27).map((_, i) => Math.sin(i + 1))
    expect(isInvariant(t, 3, '-43m')).toBe(false)
  })

  it('the subspace is maximal: its dimension equals the group average (character) formula', () => {
    // dim of invariants = (1/|G|) Σ_g tr(g ⊗ g ⊗ g restricted) — computed here by averaging the projector
    for (const symbol of ['3m', '-43m', '4mm', 'm']) {
      const G = getPointGroup(symbol).elements
      const f = solveTensorForm(symbol, 2, { symmetry: 'none' })
      let trace = 0
      for (let i = 0; i < 27; i++) {
        const e = new Float64Array(27)
        e[i] = 1
        let s = 0
        for (const g of G) s += transformTensor(e, 3, g)[i]
        trace += s / G.length
      }
      expect(f.independentCount).toBe(Math.round(trace))
    }
  })

  it('χ(4) (odd rank 5) vanishes in a centrosymmetric bulk; triclinic χ(5) has 3 × 21 components', () => {
    expect(solveTensorForm('m-3m', 4).independentCount).toBe(0)
    expect(solveTensorForm('1', 5).independentCount).toBe(63)
  })

  it('order outside 2..5 → OUT_OF_RANGE', () => {
    expect(() => solveTensorForm('-43m', 6)).toThrow(EngineError)
    try {
      solveTensorForm('-43m', 1)
    } catch (e) {
      expect((e as EngineError).code).toBe('OUT_OF_RANGE')
      expect((e as EngineError).message).toMatch(/order must be an integer from 2 to 5/)
    }
  })
})
