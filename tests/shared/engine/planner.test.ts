import { describe, it, expect } from 'vitest'
import { planFabrication, EngineError } from '../../../shared/engine'

const base = {
  pointGroup: '-43m',
  cuts: [
    { normal: [0, 0, 1], reference: [1, 0, 0] },
    { normal: [1, 1, 1], reference: [1, -1, 0] },
  ],
  shapes: [{ kind: 'disk' }, { kind: 'square' }, { kind: 'triangle' }, { kind: 'gammadion' }],
  lattices: [{ kind: 'single' }, { kind: 'square' }, { kind: 'hexagonal' }],
  pump: { type: 'circular', m: 1 },
  order: 2,
}

describe('fabrication planner', () => {
  it('co-rotating SH along the normal: every option really allows m = +1, ranked by weight then simplicity', () => {
    const plan = planFabrication({ ...base, want: 'co' })
    expect(plan.length).toBeGreaterThan(0)
    for (const o of plan) expect(o.allowedM).toContain(1)
    for (let i = 1; i < plan.length; i++) {
      const [a, b] = [plan[i - 1], plan[i]]
      expect(a.weight > b.weight || (a.weight === b.weight && a.complexity <= b.complexity)).toBe(true)
    }
    expect(plan[0].reason).toMatch(/co-rotating emission along the normal/)
  })

  it('no (001) disk or C4/C4v array appears (zinc-blende (001) emits no normal SH, common practice)', () => {
    const plan = planFabrication({ ...base, want: 'any' })
    const bad = plan.filter((o) => o.cutIndex === 0 && (o.rotationOrder === 0 || o.rotationOrder % 4 === 0))
    expect(bad).toEqual([])
  })

  it('(111) triangles on a hexagonal lattice (C3v) give counter-rotating SH (Q ∋ ±3 and n = 3)', () => {
    const plan = planFabrication({ ...base, want: 'counter' })
    expect(plan.some((o) => o.cutIndex === 1 && o.shape.kind === 'triangle' && o.lattice.kind === 'hexagonal')).toBe(
      true,
    )
  })

  it('co/counter need a circular pump; bad lists are refused with field paths', () => {
    expect(() => planFabrication({ ...base, pump: { type: 'linear', angle: 0 }, want: 'co' })).toThrow(
      expect.objectContaining({ code: 'OUT_OF_RANGE', field: 'want' }),
    )
    expect(() => planFabrication({ ...base, shapes: [] })).toThrow(expect.objectContaining({ field: 'shapes' }))
    expect(() => planFabrication({ ...base, shapes: [{ kind: 'blob' }] })).toThrow(EngineError)
    expect(() => planFabrication({ ...base, shapes: [{ kind: 'blob' }] })).toThrow(
      /^shapes\.0\.kind: unknown shape "blob"$/,
    )
  })
})
