import { describe, it, expect } from 'vitest'
import {
  shapeSymmetry,
  latticeSymmetry,
  deriveArraySymmetry,
  closeStructure,
  structureGroupName,
  generatedRotationOrder,
  computeChannels,
  EngineError,
} from '../../../shared/engine'

// Shape and lattice symmetries: elementary plane geometry (common practice).
describe('structure symmetry from shape and lattice', () => {
  it.each([
    ['disk', 0, 'all'],
    ['ring', 0, 'all'],
    ['ellipse', 2, [0, 90]],
    ['rectangle', 2, [0, 90]],
    ['dimer', 2, [0, 90]],
    ['square', 4, [0, 45, 90, 135]],
    ['cross', 4, [0, 45, 90, 135]],
    ['triangle', 3, [30, 90, 150]],
    ['hexagon', 6, [0, 30, 60, 90, 120, 150]],
    ['l-shape', 1, [45]],
    ['split-ring', 1, [90]],
    ['gammadion', 4, []],
  ] as const)('%s → n = %i, mirrors %j', (kind, n, mirrors) => {
    expect(shapeSymmetry({ kind })).toEqual({ rotationOrder: n, mirrors })
  })

  it('lattices: single C∞v, square C4v, hexagonal C6v, rectangular C2v', () => {
    expect(structureGroupName(latticeSymmetry({ kind: 'single' }))).toBe('C∞v')
    expect(structureGroupName(latticeSymmetry({ kind: 'square' }))).toBe('C4v')
    expect(structureGroupName(latticeSymmetry({ kind: 'hexagonal' }))).toBe('C6v')
    expect(structureGroupName(latticeSymmetry({ kind: 'rectangular' }))).toBe('C2v')
  })

  it('array = common subgroup (docs/physics.md §3 rule 3): triangles on a square lattice keep only the mirror at 90°', () => {
    expect(deriveArraySymmetry({ kind: 'triangle' }, { kind: 'square' })).toEqual({ rotationOrder: 1, mirrors: [90] })
    expect(deriveArraySymmetry({ kind: 'triangle' }, { kind: 'hexagonal' })).toEqual({
      rotationOrder: 3,
      mirrors: [30, 90, 150],
    })
    expect(deriveArraySymmetry({ kind: 'disk' }, { kind: 'square' })).toEqual(
      deriveArraySymmetry({ kind: 'square' }, { kind: 'square' }),
    )
    expect(deriveArraySymmetry({ kind: 'square', azimuthDeg: 30 }, { kind: 'square' })).toEqual({
      rotationOrder: 4,
      mirrors: [],
    })
    expect(deriveArraySymmetry({ kind: 'gammadion' }, { kind: 'single' })).toEqual({ rotationOrder: 4, mirrors: [] })
  })

  it('custom groups are closed: n = 3 with one mirror at 90° has mirrors 30, 90, 150', () => {
    expect(closeStructure(3, [90])).toEqual({ rotationOrder: 3, mirrors: [30, 90, 150] })
    expect(shapeSymmetry({ kind: 'custom', rotationOrder: 2, mirrors: [10] })).toEqual({
      rotationOrder: 2,
      mirrors: [10, 100],
    })
  })

  it('unknown shape → UNKNOWN_SHAPE; negative n → OUT_OF_RANGE', () => {
    expect(() => shapeSymmetry({ kind: 'blob' as never })).toThrow(EngineError)
    expect(() => shapeSymmetry({ kind: 'blob' as never })).toThrow(/shape\.kind: unknown shape "blob"/)
    expect(() => closeStructure(-1, [])).toThrow(
      expect.objectContaining({ code: 'OUT_OF_RANGE', field: 'structure.rotationOrder' }),
    )
    expect(() => latticeSymmetry({ kind: 'kagome' as never })).toThrow(
      expect.objectContaining({ code: 'UNKNOWN_LATTICE' }),
    )
  })
})

// Two reflections in lines at angle Δ compose to a rotation by 2Δ, so mirrors fix a minimum rotation
// order (the dihedral groups: M. A. Armstrong, Groups and Symmetry (Springer, 1988), ch. 5;
// International Tables for Crystallography Vol. A, the two-dimensional point groups).
describe('mirrors must agree with the rotation order', () => {
  const refusal = (n: number, mirrors: number[]) => {
    try {
      computeChannels({
        crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
        structure: { rotationOrder: n, mirrors },
        pump: { type: 'linear', angle: 0 },
        order: 2,
      })
    } catch (e) {
      return e as EngineError
    }
    return undefined
  }

  it('C2 with mirrors 45° apart implies C4v and is refused, naming the group', () => {
    const e = refusal(2, [0, 45])
    expect(e).toMatchObject({ code: 'INCONSISTENT_SYMMETRY', field: 'structure.mirrors' })
    expect(e?.message).toMatch(/generate C4v, not C2v/)
    expect(e?.message).toMatch(/rotationOrder 4 with mirrors 0°, 45°, 90°, 135°/)
  })

  it('C1 with two perpendicular mirrors implies C2v; C3 with mirrors 90° apart implies C6v; an irrational angle a continuous group', () => {
    expect(refusal(1, [0, 90])?.message).toMatch(/generate C2v, not Cs/)
    expect(refusal(3, [0, 90])?.message).toMatch(/generate C6v, not C3v/)
    expect(refusal(4, [0, 45 * Math.SQRT2])?.message).toMatch(/generate C∞v/)
  })

  it('mirrors that belong to the group are accepted, as a subset or repeated modulo 180°', () => {
    expect(refusal(4, [0, 45, 90, 135])).toBeUndefined()
    expect(refusal(3, [30])).toBeUndefined()
    expect(refusal(3, [30, 90, 150, 210])).toBeUndefined()
    expect(refusal(1, [45, 225])).toBeUndefined()
    expect(refusal(0, [0, 17.3])).toBeUndefined()
    expect(refusal(12, [5, 20])).toBeUndefined()
    expect(generatedRotationOrder(2, [0, 30])).toBe(6)
  })

  it('custom shapes and lattices are checked too', () => {
    expect(() => shapeSymmetry({ kind: 'custom', rotationOrder: 2, mirrors: [0, 60] })).toThrow(
      expect.objectContaining({ code: 'INCONSISTENT_SYMMETRY', field: 'shape.mirrors' }),
    )
    expect(() => latticeSymmetry({ kind: 'custom', rotationOrder: 2, mirrors: [0, 45] })).toThrow(/generate C4v/)
  })
})
