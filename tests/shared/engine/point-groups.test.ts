import { describe, it, expect } from 'vitest'
import { POINT_GROUP_SYMBOLS, getPointGroup, closeGroup, EngineError } from '../../../shared/engine'
import { det3, mulMat3 } from '../../../shared/engine/linalg'

// Orders of the 32 crystallographic point groups — textbook values (e.g. Nye, Physical Properties
// of Crystals, Appendix B; International Tables for Crystallography Vol. A, Table 10.1.2.2).
const ORDERS: Record<string, number> = {
  '1': 1,
  '-1': 2,
  '2': 2,
  m: 2,
  '2/m': 4,
  '222': 4,
  mm2: 4,
  mmm: 8,
  '4': 4,
  '-4': 4,
  '4/m': 8,
  '422': 8,
  '4mm': 8,
  '-42m': 8,
  '4/mmm': 16,
  '3': 3,
  '-3': 6,
  '32': 6,
  '3m': 6,
  '-3m': 12,
  '6': 6,
  '-6': 6,
  '6/m': 12,
  '622': 12,
  '6mm': 12,
  '-6m2': 12,
  '6/mmm': 24,
  '23': 12,
  'm-3': 24,
  '432': 24,
  '-43m': 24,
  'm-3m': 48,
}
// The 11 centrosymmetric (Laue) classes — textbook.
const CENTRO = ['-1', '2/m', 'mmm', '4/m', '4/mmm', '-3', '-3m', '6/m', '6/mmm', 'm-3', 'm-3m']

const key = (m: readonly number[]) => m.map((v) => Math.round(v * 1e6)).join(',')

describe('point groups (generators → closure)', () => {
  it('has exactly the 32 classes', () => {
    expect(POINT_GROUP_SYMBOLS).toHaveLength(32)
    expect(new Set(POINT_GROUP_SYMBOLS)).toEqual(new Set(Object.keys(ORDERS)))
  })

  it.each(Object.entries(ORDERS))('order of %s is %i (textbook, Nye App. B)', (symbol, order) => {
    expect(getPointGroup(symbol).order).toBe(order)
  })

  it.each(POINT_GROUP_SYMBOLS)('%s is closed under multiplication and made of orthogonal matrices', (symbol) => {
    const g = getPointGroup(symbol)
    const keys = new Set(g.elements.map(key))
    expect(keys.size).toBe(g.elements.length)
    for (const a of g.elements) {
      expect(Math.abs(Math.abs(det3(a)) - 1)).toBeLessThan(1e-12)
      for (const b of g.elements) expect(keys.has(key(mulMat3(a, b)))).toBe(true)
    }
  })

  it('flags exactly the 11 centrosymmetric classes (textbook)', () => {
    expect(POINT_GROUP_SYMBOLS.filter((s) => getPointGroup(s).isCentrosymmetric).sort()).toEqual([...CENTRO].sort())
  })

  it('standard settings: 3m has the mirror ⟂ x, 32 and -42m the diad ∥ x, mm2 the diad ∥ z (IEEE Std 176)', () => {
    const has = (symbol: string, m: number[]) => getPointGroup(symbol).elements.some((e) => key(e) === key(m))
    expect(has('3m', [-1, 0, 0, 0, 1, 0, 0, 0, 1])).toBe(true)
    expect(has('3m', [1, 0, 0, 0, -1, 0, 0, 0, 1])).toBe(false)
    expect(has('-6m2', [-1, 0, 0, 0, 1, 0, 0, 0, 1])).toBe(true)
    expect(has('32', [1, 0, 0, 0, -1, 0, 0, 0, -1])).toBe(true)
    expect(has('-42m', [1, 0, 0, 0, -1, 0, 0, 0, -1])).toBe(true)
    expect(has('mm2', [-1, 0, 0, 0, -1, 0, 0, 0, 1])).toBe(true)
    expect(has('2', [-1, 0, 0, 0, 1, 0, 0, 0, -1])).toBe(true)
  })

  it('accepts aliases and Schoenflies symbols', () => {
    expect(getPointGroup('m3m').symbol).toBe('m-3m')
    expect(getPointGroup('Td').symbol).toBe('-43m')
    expect(getPointGroup('D3h').symbol).toBe('-6m2')
  })

  it('closeGroup refuses an infinite group', () => {
    expect(() => closeGroup([[Math.cos(1), -Math.sin(1), 0, Math.sin(1), Math.cos(1), 0, 0, 0, 1]])).toThrow(
      /not finite/,
    )
  })

  it('unknown symbol → UNKNOWN_POINT_GROUP with field and message', () => {
    try {
      getPointGroup('-43q', 'crystal.pointGroup')
      expect.unreachable()
    } catch (e) {
      expect(e).toBeInstanceOf(EngineError)
      const err = e as EngineError
      expect(err.code).toBe('UNKNOWN_POINT_GROUP')
      expect(err.field).toBe('crystal.pointGroup')
      expect(err.message).toMatch(/^crystal\.pointGroup: unknown point group "-43q"/)
      expect(err.allowed).toContain('-43m')
    }
  })
})
